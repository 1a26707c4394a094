using Microsoft.EntityFrameworkCore.Migrations;

#nullable disable

namespace Triage.Cases.Store.Migrations.Sqlite
{
    /// <inheritdoc />
    public partial class AddQueueIndexes : Migration
    {
        /// <inheritdoc />
        protected override void Up(MigrationBuilder migrationBuilder)
        {
            migrationBuilder.CreateIndex(
                name: "IX_Drivers_Case_Field_Contribution",
                table: "Drivers",
                columns: new[] { "CaseId", "Field", "Contribution" });

            migrationBuilder.CreateIndex(
                name: "IX_Cases_Open_ClaimNumber",
                table: "Cases",
                column: "ClaimNumber",
                filter: "\"IsOpen\"");

            migrationBuilder.CreateIndex(
                name: "IX_Cases_Open_ClaimedAmount",
                table: "Cases",
                column: "ClaimedAmount",
                filter: "\"IsOpen\"");

            migrationBuilder.CreateIndex(
                name: "IX_Cases_Open_DueDate",
                table: "Cases",
                column: "DueDate",
                filter: "\"IsOpen\"");

            migrationBuilder.CreateIndex(
                name: "IX_Cases_Open_ReceivedDate",
                table: "Cases",
                column: "ReceivedDate",
                filter: "\"IsOpen\"");
        }

        /// <inheritdoc />
        protected override void Down(MigrationBuilder migrationBuilder)
        {
            migrationBuilder.DropIndex(
                name: "IX_Drivers_Case_Field_Contribution",
                table: "Drivers");

            migrationBuilder.DropIndex(
                name: "IX_Cases_Open_ClaimNumber",
                table: "Cases");

            migrationBuilder.DropIndex(
                name: "IX_Cases_Open_ClaimedAmount",
                table: "Cases");

            migrationBuilder.DropIndex(
                name: "IX_Cases_Open_DueDate",
                table: "Cases");

            migrationBuilder.DropIndex(
                name: "IX_Cases_Open_ReceivedDate",
                table: "Cases");
        }
    }
}
