using System.Security.Cryptography;
using System.Text;
using Microsoft.EntityFrameworkCore;
using Microsoft.EntityFrameworkCore.Metadata.Builders;
using Triage.Cases.Domain;

namespace Triage.Cases.ApiKeys;

/// <summary>
/// A key another system sends claims with. Only the SHA-256 of the secret is stored; the secret itself
/// is shown once, when the key is issued. A key has one scope and can be revoked, never un-revoked.
/// </summary>
public sealed class ApiKey
{
    public const string IntakeScope = "intake";
    private const string SecretPrefix = "trk_";
    private const int ShownPrefixLength = 12;

    private ApiKey() { }

    public int Id { get; private set; }
    public string Name { get; private set; } = "";
    /// <summary>The first characters of the secret, so people can tell keys apart without the secret.</summary>
    public string KeyPrefix { get; private set; } = "";
    public string SecretHash { get; private set; } = "";
    public string Scope { get; private set; } = "";
    public string CreatedBy { get; private set; } = "";
    public DateTime CreatedAt { get; private set; }
    public string? RevokedBy { get; private set; }
    public DateTime? RevokedAt { get; private set; }
    public DateTime? LastUsedAt { get; private set; }
    public bool IsActive => RevokedAt is null;

    public void MarkUsed(DateTime at) => LastUsedAt = at;

    /// <summary>A new key and its secret: 32 random bytes, base64url, with a recognisable prefix.</summary>
    public static (ApiKey Key, string Secret) Issue(string name, string scope, Actor by, DateTime at)
    {
        name = name?.Trim() ?? "";
        if (name.Length is 0 or > 80) throw new DomainRuleException("An API key needs a name of 1 to 80 characters, saying which system uses it.");
        if (scope != IntakeScope) throw new DomainRuleException($"Unknown API key scope '{scope}'; the only scope is '{IntakeScope}'.");
        var secret = SecretPrefix + Convert.ToBase64String(RandomNumberGenerator.GetBytes(32)).TrimEnd('=').Replace('+', '-').Replace('/', '_');
        var key = new ApiKey
        {
            Name = name,
            KeyPrefix = secret[..ShownPrefixLength],
            SecretHash = Hash(secret),
            Scope = scope,
            CreatedBy = by.UserName,
            CreatedAt = Claim.Utc(at),
        };
        return (key, secret);
    }

    public static string Hash(string secret) => Convert.ToHexStringLower(SHA256.HashData(Encoding.UTF8.GetBytes(secret)));

    public void Revoke(Actor by, DateTime at)
    {
        if (!IsActive) throw new DomainRuleException($"API key '{Name}' ({KeyPrefix}…) was already revoked on {RevokedAt:yyyy-MM-dd HH:mm} UTC.");
        RevokedBy = by.UserName;
        RevokedAt = Claim.Utc(at);
    }

    /// <summary>Who the key acts as: a caller that may only import claims (the one thing its scope reaches).</summary>
    public Actor AsActor() => new($"api-key:{Id}", $"api key '{Name}' ({KeyPrefix}…)", new HashSet<string> { Roles.Analyst });
}

internal sealed class ApiKeyConfiguration : IEntityTypeConfiguration<ApiKey>
{
    public void Configure(EntityTypeBuilder<ApiKey> k)
    {
        k.HasIndex(x => x.SecretHash).IsUnique();
        k.Property(x => x.Name).HasMaxLength(80);
        k.Property(x => x.KeyPrefix).HasMaxLength(16);
        k.Property(x => x.SecretHash).HasMaxLength(64);
        k.Property(x => x.Scope).HasMaxLength(32);
        k.Property(x => x.CreatedBy).HasMaxLength(256);
        k.Property(x => x.RevokedBy).HasMaxLength(256);
        k.Ignore(x => x.IsActive);
    }
}
