using Triage.Cases;
using Triage.Cases.Hosting;
using Triage.Web;

var builder = WebApplication.CreateBuilder(args);
builder.Configuration.AddTriageSettings(builder.Environment.EnvironmentName);
// `dotnet run` starts in Production; without this the framework and MudBlazor assets that live in
// package folders are not served from build output. A published copy has no manifest: no-op there.
builder.WebHost.UseStaticWebAssets();
builder.AddTriageCases();
builder.AddTriageWeb();

var app = builder.Build();
await app.Services.InitialiseStoreAsync();
app.MapTriageWeb();
app.Run();
