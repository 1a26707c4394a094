using System.ComponentModel.DataAnnotations;
using OpenTelemetry;
using OpenTelemetry.Exporter;
using OpenTelemetry.Metrics;
using OpenTelemetry.Resources;
using OpenTelemetry.Trace;
using Triage.Cases.Operations;

namespace Triage.Web.Operations;

public enum OtlpProtocol { Grpc, HttpProtobuf }

/// <summary>Where to send traces, metrics and logs over OTLP. Nothing is exported unless an endpoint is set.</summary>
public sealed class TelemetryOptions
{
    public const string Section = "Telemetry";

    /// <summary>The collector's address, e.g. http://collector:4317. The standard OTEL_EXPORTER_OTLP_ENDPOINT variable works too.</summary>
    [Url(ErrorMessage = "Telemetry:OtlpEndpoint must be an absolute http or https address, such as http://collector:4317.")] public string? OtlpEndpoint { get; set; }

    public OtlpProtocol OtlpProtocol { get; set; } = OtlpProtocol.Grpc;

    [Required(ErrorMessage = "Telemetry:ServiceName must not be empty.")] public string ServiceName { get; set; } = "triage";
}

public static class Telemetry
{
    /// <summary>
    /// ASP.NET Core requests (traces and metrics), the app's own "Triage" meter and the logs, exported over OTLP
    /// when <c>Telemetry:OtlpEndpoint</c> or <c>OTEL_EXPORTER_OTLP_ENDPOINT</c> is set; otherwise OpenTelemetry is
    /// not switched on at all (the meters can still be read with dotnet-counters).
    /// </summary>
    public static IHostApplicationBuilder AddTriageTelemetry(this IHostApplicationBuilder b)
    {
        b.Services.AddOptions<TelemetryOptions>().BindConfiguration(TelemetryOptions.Section).ValidateDataAnnotations().ValidateOnStart();
        var options = b.Configuration.GetSection(TelemetryOptions.Section).Get<TelemetryOptions>() ?? new TelemetryOptions();
        var standardEndpoint = b.Configuration["OTEL_EXPORTER_OTLP_ENDPOINT"];
        if (string.IsNullOrWhiteSpace(options.OtlpEndpoint) && string.IsNullOrWhiteSpace(standardEndpoint)) return b;

        var otel = b.Services.AddOpenTelemetry()
            .ConfigureResource(r => r.AddService(options.ServiceName))
            .WithTracing(t => t.AddAspNetCoreInstrumentation())
            .WithMetrics(m => m.AddAspNetCoreInstrumentation().AddMeter(TriageMetrics.MeterName))
            .WithLogging();
        if (Uri.TryCreate(options.OtlpEndpoint, UriKind.Absolute, out var endpoint))
            otel.UseOtlpExporter(options.OtlpProtocol == OtlpProtocol.Grpc ? OtlpExportProtocol.Grpc : OtlpExportProtocol.HttpProtobuf, endpoint);
        else
            // Reads the standard OTEL_EXPORTER_OTLP_* variables itself.
            otel.UseOtlpExporter();
        return b;
    }
}
