namespace Lookahead.Api.Charts;

/// <summary>Marks an endpoint whose 200 can also be an SVG chart (?format=svg).</summary>
public sealed class SvgAlternativeMetadata;

/// <summary>Adds image/svg+xml beside the JSON schema of the 200 answer.</summary>
public sealed class SvgResponseFilter : AlternativeResponseFilter<SvgAlternativeMetadata>
{
    protected override string ContentType => ResponseFormats.SvgContentType;

    protected override string Description => "An SVG chart of the trajectories (with ?format=svg).";
}
