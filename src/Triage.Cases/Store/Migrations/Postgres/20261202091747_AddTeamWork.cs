using System;
using Microsoft.EntityFrameworkCore.Migrations;

#nullable disable

namespace Triage.Cases.Store.Migrations.Postgres
{
    /// <inheritdoc />
    public partial class AddTeamWork : Migration
    {
        /// <inheritdoc />
        protected override void Up(MigrationBuilder migrationBuilder)
        {
            migrationBuilder.AlterColumn<string>(
                name: "ToUserId",
                table: "Assignment",
                type: "text",
                nullable: true,
                oldClrType: typeof(string),
                oldType: "text");

            migrationBuilder.AddColumn<string>(
                name: "AbsenceNote",
                table: "AspNetUsers",
                type: "character varying(200)",
                maxLength: 200,
                nullable: true);

            migrationBuilder.AddColumn<DateTime>(
                name: "AbsentSince",
                table: "AspNetUsers",
                type: "timestamp with time zone",
                nullable: true);

            migrationBuilder.CreateIndex(
                name: "IX_Cases_ClosedAt_Assignee",
                table: "Cases",
                columns: new[] { "ClosedAt", "AssigneeId" });

            migrationBuilder.CreateIndex(
                name: "IX_Assignment_At_ToUserId",
                table: "Assignment",
                columns: new[] { "At", "ToUserId" });
        }

        /// <inheritdoc />
        protected override void Down(MigrationBuilder migrationBuilder)
        {
            migrationBuilder.DropIndex(
                name: "IX_Cases_ClosedAt_Assignee",
                table: "Cases");

            migrationBuilder.DropIndex(
                name: "IX_Assignment_At_ToUserId",
                table: "Assignment");

            migrationBuilder.DropColumn(
                name: "AbsenceNote",
                table: "AspNetUsers");

            migrationBuilder.DropColumn(
                name: "AbsentSince",
                table: "AspNetUsers");

            migrationBuilder.AlterColumn<string>(
                name: "ToUserId",
                table: "Assignment",
                type: "text",
                nullable: false,
                defaultValue: "",
                oldClrType: typeof(string),
                oldType: "text",
                oldNullable: true);
        }
    }
}
