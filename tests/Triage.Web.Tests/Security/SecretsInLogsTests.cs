using System.Collections.Concurrent;
using System.Net;
using System.Text;
using Microsoft.AspNetCore.Hosting;
using Microsoft.Extensions.DependencyInjection;
using Microsoft.Extensions.Logging;
using Triage.Cases.ApiKeys;
using Triage.Cases.Domain;
using Triage.Cases.Export;
using Triage.Cases.Hosting;
using Triage.Cases.Tests.Intake;
using Triage.Cases.Tests.Support;
using Triage.Web.Intake;
using Triage.Web.Tests.Support;

namespace Triage.Web.Tests.Security;

/// <summary>
/// Everything the app logs, at every level, from a first start with the demo enabled through signing in with
/// the demo password, sending claims with an API key and a pseudonymised export: no secret appears in it.
/// </summary>
public sealed class SecretsInLogsTests
{
    [Fact]
    public async Task Neither_the_demo_password_nor_an_api_key_nor_the_pseudonym_key_is_ever_logged()
    {
        var log = new CapturedLog();
        await using var fresh = new TriageWebFactory();
        await using var app = fresh.WithWebHostBuilder(b => b.ConfigureLogging(l => l.AddProvider(log).AddFilter<CapturedLog>(null, LogLevel.Trace)));

        var client = SignInClient.Anonymous(app);
        Assert.Equal("/", (await SignInClient.PostAsync(client, "olu.berg", TinySeed.Password)).Headers.Location!.OriginalString);
        Assert.Contains("error=invalid", (await SignInClient.PostAsync(SignInClient.Anonymous(app), "olu.berg", TinySeed.Password + "x")).Headers.Location!.OriginalString);

        string secret;
        using (var scope = app.Services.CreateScope())
            secret = (await scope.ServiceProvider.GetRequiredService<ApiKeyService>().CreateAsync("log test", Actor.System)).Secret;
        using var request = new HttpRequestMessage(HttpMethod.Post, IntakeEndpoints.Route)
        {
            Content = new StringContent(IntakeRows.Csv(IntakeRows.Many(3, "LOG")), Encoding.UTF8, "text/csv"),
            Headers = { { IntakeEndpoints.KeyHeader, secret } },
        };
        Assert.Equal(HttpStatusCode.OK, (await app.CreateClient().SendAsync(request)).StatusCode);

        var export = await client.GetAsync("/export/outcomes.csv?pseudonymise=true");
        Assert.Equal(HttpStatusCode.OK, export.StatusCode);
        Assert.Contains("ps-", await export.Content.ReadAsStringAsync());
        var keyText = File.ReadAllText(Path.Combine(app.Services.GetRequiredService<TriagePaths>().DataFolder, Pseudonyms.KeyFileName)).Trim();
        var keyHex = Convert.ToHexString(Convert.FromBase64String(keyText));

        var text = log.Text();
        // The capture works: first start, the sign-ins and the import all logged something.
        Assert.Contains("Imported request body", text);
        Assert.True(log.Count > 100, $"only {log.Count} log entries were captured");
        Assert.DoesNotContain(TinySeed.Password, text);
        Assert.DoesNotContain(secret, text);
        Assert.DoesNotContain(secret[..12], text);
        Assert.DoesNotContain(keyText, text);
        Assert.DoesNotContain(keyHex, text, StringComparison.OrdinalIgnoreCase);
    }

    /// <summary>Every entry as it would be written: category, message, exception and scope values.</summary>
    private sealed class CapturedLog : ILoggerProvider, ISupportExternalScope
    {
        private readonly ConcurrentQueue<string> _entries = new();
        private IExternalScopeProvider _scopes = new LoggerExternalScopeProvider();

        public int Count => _entries.Count;
        public string Text() => string.Join('\n', _entries);
        public ILogger CreateLogger(string category) => new Logger(this, category);
        public void SetScopeProvider(IExternalScopeProvider scopes) => _scopes = scopes;
        public void Dispose() { }

        private sealed class Logger(CapturedLog owner, string category) : ILogger
        {
            public IDisposable? BeginScope<TState>(TState state) where TState : notnull => owner._scopes.Push(state);
            public bool IsEnabled(LogLevel level) => true;

            public void Log<TState>(LogLevel level, EventId id, TState state, Exception? exception, Func<TState, Exception?, string> formatter)
            {
                var entry = new StringBuilder($"{level} {category}: {formatter(state, exception)} {exception}");
                if (state is IEnumerable<KeyValuePair<string, object?>> values) foreach (var (k, v) in values) entry.Append($" {k}={v}");
                owner._scopes.ForEachScope((scope, sb) => sb.Append(" scope=").Append(scope), entry);
                owner._entries.Enqueue(entry.ToString());
            }
        }
    }
}
