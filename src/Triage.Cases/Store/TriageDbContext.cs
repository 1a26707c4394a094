using Microsoft.AspNetCore.Identity.EntityFrameworkCore;
using Microsoft.EntityFrameworkCore;
using Triage.Cases.ApiKeys;
using Triage.Cases.Domain;
using Triage.Cases.Intake;
using Triage.Cases.Models;

namespace Triage.Cases.Store;

/// <summary>
/// The one store: claims, cases and their history, models, playbook, and the Identity tables.
/// Each provider has its own subclass so each keeps its own migrations.
/// </summary>
public abstract class TriageDbContext(DbContextOptions options) : IdentityDbContext<TriageUser>(options)
{
    public DbSet<Claim> Claims => Set<Claim>();
    public DbSet<Case> Cases => Set<Case>();
    public DbSet<DriverSnapshot> Drivers => Set<DriverSnapshot>();
    public DbSet<CheckItem> Checks => Set<CheckItem>();
    public DbSet<Verdict> Verdicts => Set<Verdict>();
    public DbSet<AuditEvent> AuditEvents => Set<AuditEvent>();
    public DbSet<ModelVersion> ModelVersions => Set<ModelVersion>();
    public DbSet<ModelChange> ModelChanges => Set<ModelChange>();
    public DbSet<SupersededDriver> SupersededDrivers => Set<SupersededDriver>();
    public DbSet<PlaybookRule> PlaybookRules => Set<PlaybookRule>();
    public DbSet<ClaimScore> ClaimScores => Set<ClaimScore>();
    public DbSet<ApiKey> ApiKeys => Set<ApiKey>();

    // A bare boolean column reads as "is true" in both SQLite and PostgreSQL. SQLite uses a partial
    // index only when the query repeats the index's WHERE term, and EF writes `WHERE "c"."IsOpen"`.
    private const string OpenOnly = "\"IsOpen\"";

    protected override void OnModelCreating(ModelBuilder b)
    {
        base.OnModelCreating(b);
        b.ApplyConfiguration(new ClaimScoreConfiguration());
        b.ApplyConfiguration(new ApiKeyConfiguration());
        b.ApplyConfiguration(new ModelVersionConfiguration());
        b.ApplyConfiguration(new ModelChangeConfiguration());
        b.ApplyConfiguration(new SupersededDriverConfiguration());

        b.Entity<TriageUser>(u =>
        {
            u.Property(x => x.DisplayName).HasMaxLength(120);
            u.Property(x => x.Lines).HasMaxLength(200);
            u.Property(x => x.AbsenceNote).HasMaxLength(200);
            u.Ignore(x => x.IsAbsent);
        });

        b.Entity<Claim>(c =>
        {
            c.HasIndex(x => x.ClaimNumber).IsUnique();
            c.HasIndex(x => new { x.State, x.ReportDate });
            c.Property(x => x.ClaimNumber).HasMaxLength(64);
            c.Property(x => x.Line).HasMaxLength(32);
            c.Property(x => x.State).HasConversion<string>().HasMaxLength(16);
            c.Property(x => x.Outcome).HasConversion<string>().HasMaxLength(16);
        });

        b.Entity<Case>(c =>
        {
            c.HasOne(x => x.Claim).WithOne().HasForeignKey<Case>(x => x.ClaimId);
            c.HasOne(x => x.Assignee).WithMany().HasForeignKey(x => x.AssigneeId).OnDelete(DeleteBehavior.Restrict);
            c.Property(x => x.Status).HasConversion<string>().HasMaxLength(16);
            c.Property(x => x.ClaimNumber).HasMaxLength(64);
            c.Property(x => x.Line).HasMaxLength(32);
            c.Property(x => x.ModelVersion).HasMaxLength(64);
            c.Property(x => x.TopDriver1).HasMaxLength(120);
            c.Property(x => x.TopDriver2).HasMaxLength(120);
            c.Property(x => x.AssigneeName).HasMaxLength(120);
            c.Property(x => x.Version).IsConcurrencyToken();
            // The queue: open cases by risk, optionally for one line and/or one assignee. Partial indexes
            // hold only open cases, so they stay small while closed history grows.
            c.HasIndex(x => x.Probability, "IX_Cases_Open_Probability").HasFilter(OpenOnly);
            c.HasIndex(x => new { x.Line, x.Probability }, "IX_Cases_Open_Line_Probability").HasFilter(OpenOnly);
            c.HasIndex(x => new { x.AssigneeId, x.Probability }, "IX_Cases_Open_Assignee_Probability").HasFilter(OpenOnly);
            c.HasIndex(x => new { x.AssigneeId, x.Line, x.Probability }, "IX_Cases_Open_Assignee_Line_Probability").HasFilter(OpenOnly);
            // The other sorts a lead uses over the whole open queue, so each first page is read in order, not sorted.
            c.HasIndex(x => x.DueDate, "IX_Cases_Open_DueDate").HasFilter(OpenOnly);
            c.HasIndex(x => x.ClaimedAmount, "IX_Cases_Open_ClaimedAmount").HasFilter(OpenOnly);
            c.HasIndex(x => x.ReceivedDate, "IX_Cases_Open_ReceivedDate").HasFilter(OpenOnly);
            c.HasIndex(x => x.ClaimNumber, "IX_Cases_Open_ClaimNumber").HasFilter(OpenOnly);
            // The team page counts each person's cases closed this week.
            c.HasIndex(x => new { x.ClosedAt, x.AssigneeId }, "IX_Cases_ClosedAt_Assignee");
            c.Ignore(x => x.CurrentVerdict);
        });

        b.Entity<DriverSnapshot>(d =>
        {
            d.HasIndex(x => new { x.CaseId, x.Rank }).IsUnique();
            // The queue's driver filter asks "did this field raise this case?" per case: answered from the index alone.
            d.HasIndex(x => new { x.CaseId, x.Field, x.Contribution }, "IX_Drivers_Case_Field_Contribution");
            d.Property(x => x.Field).HasMaxLength(64);
            d.Property(x => x.DisplayName).HasMaxLength(120);
            d.Ignore(x => x.Raises);
        });
        b.Entity<CheckItem>(c =>
        {
            c.Property(x => x.DriverField).HasMaxLength(64);
            c.Ignore(x => x.IsDone);
        });
        b.Entity<Verdict>(v =>
        {
            v.Property(x => x.Outcome).HasConversion<string>().HasMaxLength(16);
            v.HasOne<Verdict>().WithMany().HasForeignKey(x => x.AmendsVerdictId).OnDelete(DeleteBehavior.Restrict);
            v.Ignore(x => x.IsCurrent);
        });
        // The team page counts today's assignments per person; return-to-pool rows have no ToUserId.
        b.Entity<Assignment>(a => a.HasIndex(x => new { x.At, x.ToUserId }));
        b.Entity<AuditEvent>(a =>
        {
            a.HasOne<Case>().WithMany(x => x.Audit).HasForeignKey(x => x.CaseId);
            a.HasIndex(x => x.At);
            a.Property(x => x.What).HasMaxLength(64);
        });
        b.Entity<PlaybookRule>(r =>
        {
            r.Property(x => x.Direction).HasConversion<string>().HasMaxLength(16);
            r.Property(x => x.ConditionOp).HasConversion<string>().HasMaxLength(16);
            r.Property(x => x.Field).HasMaxLength(64);
            r.OwnsMany(x => x.Checks, c =>
            {
                // A single-column key: SQLite cannot generate values inside a composite key.
                c.ToTable("PlaybookChecks");
                c.Property<int>("Id");
                c.HasKey("Id");
            });
        });
    }

    public override async Task<int> SaveChangesAsync(bool acceptAllChangesOnSuccess, CancellationToken cancellationToken = default)
    {
        try
        {
            return await base.SaveChangesAsync(acceptAllChangesOnSuccess, cancellationToken);
        }
        catch (DbUpdateConcurrencyException e) when (e.Entries.Any(x => x.Entity is Case))
        {
            var stale = (Case)e.Entries.First(x => x.Entity is Case).Entity;
            throw new StaleCaseException(
                $"Case {stale.ClaimNumber} was changed by someone else after you opened it; reload the case and try again.", e);
        }
    }
}
