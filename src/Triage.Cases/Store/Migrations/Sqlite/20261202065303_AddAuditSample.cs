using Microsoft.EntityFrameworkCore.Migrations;

#nullable disable

namespace Triage.Cases.Store.Migrations.Sqlite
{
    /// <inheritdoc />
    public partial class AddAuditSample : Migration
    {
        /// <inheritdoc />
        protected override void Up(MigrationBuilder migrationBuilder)
        {
            migrationBuilder.AddColumn<bool>(
                name: "IsAuditSample",
                table: "Cases",
                type: "INTEGER",
                nullable: false,
                defaultValue: false);

            migrationBuilder.AddColumn<double>(
                name: "SelectionProbability",
                table: "Cases",
                type: "REAL",
                nullable: false,
                defaultValue: 1.0);
        }

        /// <inheritdoc />
        protected override void Down(MigrationBuilder migrationBuilder)
        {
            migrationBuilder.DropColumn(
                name: "IsAuditSample",
                table: "Cases");

            migrationBuilder.DropColumn(
                name: "SelectionProbability",
                table: "Cases");
        }
    }
}
