using System;
using Microsoft.EntityFrameworkCore.Migrations;
using Npgsql.EntityFrameworkCore.PostgreSQL.Metadata;

#nullable disable

namespace Triage.Cases.Store.Migrations.Postgres
{
    /// <inheritdoc />
    public partial class AddModelRegistry : Migration
    {
        /// <inheritdoc />
        protected override void Up(MigrationBuilder migrationBuilder)
        {
            migrationBuilder.AddColumn<string>(
                name: "ComparedWith",
                table: "ModelVersions",
                type: "character varying(64)",
                maxLength: 64,
                nullable: true);

            migrationBuilder.AddColumn<string>(
                name: "ComparisonJson",
                table: "ModelVersions",
                type: "text",
                nullable: true);

            migrationBuilder.AddColumn<string>(
                name: "PromotionNote",
                table: "ModelVersions",
                type: "character varying(2000)",
                maxLength: 2000,
                nullable: true);

            migrationBuilder.AddColumn<string>(
                name: "SettingsJson",
                table: "ModelVersions",
                type: "text",
                nullable: true);

            migrationBuilder.AddColumn<string>(
                name: "Status",
                table: "ModelVersions",
                type: "character varying(16)",
                maxLength: 16,
                nullable: false,
                defaultValue: "");

            migrationBuilder.CreateTable(
                name: "ModelChanges",
                columns: table => new
                {
                    Id = table.Column<int>(type: "integer", nullable: false)
                        .Annotation("Npgsql:ValueGenerationStrategy", NpgsqlValueGenerationStrategy.IdentityByDefaultColumn),
                    ModelVersionId = table.Column<int>(type: "integer", nullable: false),
                    Kind = table.Column<string>(type: "character varying(16)", maxLength: 16, nullable: false),
                    By = table.Column<string>(type: "character varying(256)", maxLength: 256, nullable: false),
                    At = table.Column<DateTime>(type: "timestamp with time zone", nullable: false),
                    Note = table.Column<string>(type: "character varying(2000)", maxLength: 2000, nullable: true),
                    OtherVersion = table.Column<string>(type: "character varying(64)", maxLength: 64, nullable: true)
                },
                constraints: table =>
                {
                    table.PrimaryKey("PK_ModelChanges", x => x.Id);
                    table.ForeignKey(
                        name: "FK_ModelChanges_ModelVersions_ModelVersionId",
                        column: x => x.ModelVersionId,
                        principalTable: "ModelVersions",
                        principalColumn: "Id",
                        onDelete: ReferentialAction.Cascade);
                });

            migrationBuilder.CreateTable(
                name: "SupersededDrivers",
                columns: table => new
                {
                    Id = table.Column<long>(type: "bigint", nullable: false)
                        .Annotation("Npgsql:ValueGenerationStrategy", NpgsqlValueGenerationStrategy.IdentityByDefaultColumn),
                    CaseId = table.Column<int>(type: "integer", nullable: false),
                    ModelVersion = table.Column<string>(type: "character varying(64)", maxLength: 64, nullable: false),
                    SupersededAt = table.Column<DateTime>(type: "timestamp with time zone", nullable: false),
                    Rank = table.Column<int>(type: "integer", nullable: false),
                    Field = table.Column<string>(type: "character varying(64)", maxLength: 64, nullable: false),
                    DisplayName = table.Column<string>(type: "character varying(120)", maxLength: 120, nullable: false),
                    ValueText = table.Column<string>(type: "text", nullable: false),
                    Contribution = table.Column<double>(type: "double precision", nullable: false),
                    EffectPoints = table.Column<double>(type: "double precision", nullable: false),
                    Comparison = table.Column<string>(type: "text", nullable: false)
                },
                constraints: table =>
                {
                    table.PrimaryKey("PK_SupersededDrivers", x => x.Id);
                    table.ForeignKey(
                        name: "FK_SupersededDrivers_Cases_CaseId",
                        column: x => x.CaseId,
                        principalTable: "Cases",
                        principalColumn: "Id",
                        onDelete: ReferentialAction.Cascade);
                });

            migrationBuilder.CreateIndex(
                name: "IX_ModelChanges_At",
                table: "ModelChanges",
                column: "At");

            migrationBuilder.CreateIndex(
                name: "IX_ModelChanges_ModelVersionId",
                table: "ModelChanges",
                column: "ModelVersionId");

            migrationBuilder.CreateIndex(
                name: "IX_SupersededDrivers_CaseId",
                table: "SupersededDrivers",
                column: "CaseId");

            // Versions from before the registry: the serving one is the champion, the others served before.
            migrationBuilder.Sql("UPDATE \"ModelVersions\" SET \"Status\" = CASE WHEN \"IsServing\" THEN 'Champion' ELSE 'Retired' END;");
        }

        /// <inheritdoc />
        protected override void Down(MigrationBuilder migrationBuilder)
        {
            migrationBuilder.DropTable(
                name: "ModelChanges");

            migrationBuilder.DropTable(
                name: "SupersededDrivers");

            migrationBuilder.DropColumn(
                name: "ComparedWith",
                table: "ModelVersions");

            migrationBuilder.DropColumn(
                name: "ComparisonJson",
                table: "ModelVersions");

            migrationBuilder.DropColumn(
                name: "PromotionNote",
                table: "ModelVersions");

            migrationBuilder.DropColumn(
                name: "SettingsJson",
                table: "ModelVersions");

            migrationBuilder.DropColumn(
                name: "Status",
                table: "ModelVersions");
        }
    }
}
