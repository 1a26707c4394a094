using Triage.Cases;
using Triage.Cases.Hosting;
using Triage.Web;

var builder = WebApplication.CreateBuilder(args);
builder.Configuration.AddTriageSettings(builder.Environment.EnvironmentName);
builder.AddTriageCases();
builder.AddTriageWeb();

var app = builder.Build();
await app.Services.InitialiseStoreAsync();
app.MapTriageWeb();
app.Run();
