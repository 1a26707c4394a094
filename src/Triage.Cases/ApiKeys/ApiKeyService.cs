using Microsoft.EntityFrameworkCore;
using Triage.Cases.Domain;
using Triage.Cases.Store;

namespace Triage.Cases.ApiKeys;

public sealed record ApiKeyInfo(int Id, string Name, string KeyPrefix, string Scope, string CreatedBy, DateTime CreatedAt,
    string? RevokedBy, DateTime? RevokedAt, DateTime? LastUsedAt)
{
    public bool IsActive => RevokedAt is null;
}

/// <param name="Secret">Shown to the admin once; the store keeps only its hash.</param>
public sealed record IssuedApiKey(ApiKeyInfo Key, string Secret);

/// <summary>Issues, lists and revokes API keys (admins only, each action audited) and checks keys sent with requests.</summary>
public sealed class ApiKeyService(TriageDbContext db, TimeProvider clock)
{
    public async Task<IssuedApiKey> CreateAsync(string name, Actor by, CancellationToken ct = default)
    {
        by.Require("create API keys", Roles.Admin);
        var now = clock.GetUtcNow().UtcDateTime;
        var (key, secret) = ApiKey.Issue(name, ApiKey.IntakeScope, by, now);
        db.Add(key);
        db.AuditEvents.Add(new AuditEvent(by.UserName, "api-key.created", $"'{key.Name}' ({key.KeyPrefix}…), scope {key.Scope}", now));
        await db.SaveChangesAsync(ct);
        return new IssuedApiKey(Info(key), secret);
    }

    public async Task<IReadOnlyList<ApiKeyInfo>> ListAsync(Actor by, CancellationToken ct = default)
    {
        by.Require("see API keys", Roles.Admin);
        var keys = await db.ApiKeys.AsNoTracking().OrderBy(k => k.Id).ToListAsync(ct);
        return [.. keys.Select(Info)];
    }

    /// <summary>Revokes by id or by the shown prefix.</summary>
    public async Task<ApiKeyInfo> RevokeAsync(string idOrPrefix, Actor by, CancellationToken ct = default)
    {
        by.Require("revoke API keys", Roles.Admin);
        var key = int.TryParse(idOrPrefix, out var id)
            ? await db.ApiKeys.SingleOrDefaultAsync(k => k.Id == id, ct)
            : await db.ApiKeys.SingleOrDefaultAsync(k => k.KeyPrefix == idOrPrefix.TrimEnd('…', '.'), ct);
        if (key is null) throw new DomainRuleException($"No API key has the id or prefix '{idOrPrefix}'.");
        var now = clock.GetUtcNow().UtcDateTime;
        key.Revoke(by, now);
        db.AuditEvents.Add(new AuditEvent(by.UserName, "api-key.revoked", $"'{key.Name}' ({key.KeyPrefix}…)", now));
        await db.SaveChangesAsync(ct);
        return Info(key);
    }

    private static readonly TimeSpan LastUsedPrecision = TimeSpan.FromMinutes(1);

    /// <summary>The active key with this secret and scope, or null (unknown, revoked or another scope).</summary>
    public async Task<ApiKey?> AuthenticateAsync(string? secret, string scope, CancellationToken ct = default)
    {
        if (string.IsNullOrWhiteSpace(secret)) return null;
        var hash = ApiKey.Hash(secret.Trim());
        var key = await db.ApiKeys.AsNoTracking().SingleOrDefaultAsync(k => k.SecretHash == hash, ct);
        if (key is null || !key.IsActive || key.Scope != scope) return null;
        // "Last used" to the minute is enough for an admin, and a write per request would queue every API call
        // behind the imports for SQLite's one write lock. A tracked save takes its write turn like any other.
        var now = clock.GetUtcNow().UtcDateTime;
        if (key.LastUsedAt is not { } last || now - last >= LastUsedPrecision)
        {
            db.ApiKeys.Attach(key);
            key.MarkUsed(now);
            await db.SaveChangesAsync(ct);
        }
        return key;
    }

    private static ApiKeyInfo Info(ApiKey k) => new(k.Id, k.Name, k.KeyPrefix, k.Scope, k.CreatedBy, k.CreatedAt, k.RevokedBy, k.RevokedAt, k.LastUsedAt);
}
