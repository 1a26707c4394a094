using Microsoft.EntityFrameworkCore;
using Microsoft.Extensions.DependencyInjection;
using Triage.Cases.ApiKeys;
using Triage.Cases.Domain;
using Triage.Cases.Tests.Support;

namespace Triage.Cases.Tests.Intake;

public sealed class ApiKeyTests : IAsyncLifetime
{
    private static readonly Actor Admin = new("id-admin", "ad.min", new HashSet<string> { Roles.Admin });
    private TestStore _store = null!;

    public async Task InitializeAsync()
    {
        _store = TestStore.Create();
        await (await _store.MigratedAsync()).DisposeAsync();
    }

    public async Task DisposeAsync() => await _store.DisposeAsync();

    private ApiKeyService Keys() => _store.Host.Services.CreateScope().ServiceProvider.GetRequiredService<ApiKeyService>();

    [Fact]
    public void The_hash_is_sha256_of_the_secret() =>
        // FIPS 180-2, appendix B.1: SHA-256("abc").
        Assert.Equal("ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad", ApiKey.Hash("abc"));

    [Fact]
    public async Task A_key_is_shown_once_stored_hashed_and_works_until_revoked()
    {
        var issued = await Keys().CreateAsync("claims system", Admin);
        Assert.StartsWith("trk_", issued.Secret);
        Assert.True(issued.Secret.Length >= 40);
        await using (var db = _store.NewContext())
        {
            var row = await db.ApiKeys.AsNoTracking().SingleAsync();
            Assert.Equal(ApiKey.Hash(issued.Secret), row.SecretHash);
            Assert.DoesNotContain(issued.Secret, row.SecretHash + row.KeyPrefix + row.Name);
        }
        var found = await Keys().AuthenticateAsync(issued.Secret, ApiKey.IntakeScope);
        Assert.Equal(issued.Key.Id, found?.Id);
        Assert.Null(await Keys().AuthenticateAsync(issued.Secret + "x", ApiKey.IntakeScope));
        Assert.Null(await Keys().AuthenticateAsync(issued.Secret, "other"));

        await Keys().RevokeAsync(issued.Key.KeyPrefix, Admin);
        Assert.Null(await Keys().AuthenticateAsync(issued.Secret, ApiKey.IntakeScope));
        var again = await Assert.ThrowsAsync<DomainRuleException>(() => Keys().RevokeAsync(issued.Key.Id.ToString(), Admin));
        Assert.Contains("already revoked", again.Message);
        var listed = Assert.Single(await Keys().ListAsync(Admin));
        Assert.False(listed.IsActive);
        await using var check = _store.NewContext();
        Assert.Equal(["api-key.created", "api-key.revoked"], await check.AuditEvents.Where(a => a.What.StartsWith("api-key")).OrderBy(a => a.Id).Select(a => a.What).ToListAsync());
    }

    [Fact]
    public async Task Only_admins_manage_keys()
    {
        var analyst = new Actor("id-an", "an", new HashSet<string> { Roles.Analyst });
        await Assert.ThrowsAsync<AccessDeniedException>(() => Keys().CreateAsync("x", analyst));
        await Assert.ThrowsAsync<AccessDeniedException>(() => Keys().ListAsync(analyst));
        await Assert.ThrowsAsync<AccessDeniedException>(() => Keys().RevokeAsync("1", analyst));
        await Assert.ThrowsAsync<DomainRuleException>(() => Keys().CreateAsync("  ", Admin));
    }
}
