using Microsoft.EntityFrameworkCore;
using Microsoft.EntityFrameworkCore.Metadata.Builders;
using Triage.Cases.Domain;

namespace Triage.Cases.Models;

internal sealed class ModelVersionConfiguration : IEntityTypeConfiguration<ModelVersion>
{
    public void Configure(EntityTypeBuilder<ModelVersion> m)
    {
        m.HasIndex(x => x.Version).IsUnique();
        // The database itself refuses a second serving model.
        m.HasIndex(x => x.IsServing).IsUnique().HasFilter("\"IsServing\"");
        m.Property(x => x.Version).HasMaxLength(64);
        m.Property(x => x.Trainer).HasMaxLength(32);
        m.Property(x => x.Status).HasConversion<string>().HasMaxLength(16);
        m.Property(x => x.ComparedWith).HasMaxLength(64);
        m.Property(x => x.PromotionNote).HasMaxLength(2000);
        m.HasMany(x => x.Changes).WithOne().HasForeignKey(x => x.ModelVersionId);
    }
}

internal sealed class ModelChangeConfiguration : IEntityTypeConfiguration<ModelChange>
{
    public void Configure(EntityTypeBuilder<ModelChange> c)
    {
        c.Property(x => x.Kind).HasConversion<string>().HasMaxLength(16);
        c.Property(x => x.By).HasMaxLength(256);
        c.Property(x => x.Note).HasMaxLength(2000);
        c.Property(x => x.OtherVersion).HasMaxLength(64);
        c.HasIndex(x => x.At);
    }
}

internal sealed class SupersededDriverConfiguration : IEntityTypeConfiguration<SupersededDriver>
{
    public void Configure(EntityTypeBuilder<SupersededDriver> d)
    {
        d.HasOne<Case>().WithMany(x => x.SupersededDrivers).HasForeignKey(x => x.CaseId);
        d.HasIndex(x => x.CaseId);
        d.Property(x => x.ModelVersion).HasMaxLength(64);
        d.Property(x => x.Field).HasMaxLength(64);
        d.Property(x => x.DisplayName).HasMaxLength(120);
    }
}
