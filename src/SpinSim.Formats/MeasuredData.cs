using SpinSim.Core.Processing;
using SpinSim.Core.Traces;

namespace SpinSim.Formats;

/// <summary>What a measured-data file holds, as read: a spectrum trace, or a time-domain FID not yet processed.</summary>
public sealed class MeasuredData
{
    public MeasuredData(SpectrumTrace spectrum) => Spectrum = spectrum ?? throw new ArgumentNullException(nameof(spectrum));

    public MeasuredData(FreeInductionDecay fid) => Fid = fid ?? throw new ArgumentNullException(nameof(fid));

    public SpectrumTrace? Spectrum { get; }

    public FreeInductionDecay? Fid { get; }

    /// <summary>"spectrum" or "fid", as in <see cref="ProcessingRecord.Kind"/>.</summary>
    public string Kind => Fid is null ? ProcessingRecord.SpectrumKind : ProcessingRecord.FidKind;

    public TraceOrigin Origin => Fid?.Origin ?? Spectrum!.Origin;

    /// <summary>The spectrum, or the FID processed with <paramref name="processing"/> (defaults when null).</summary>
    /// <exception cref="SpectrumFileException">The processing options cannot apply to this FID.</exception>
    public SpectrumTrace ToTrace(ProcessingOptions? processing = null)
    {
        if (Fid is null) return Spectrum!;
        try
        {
            return FidProcessor.Process(Fid, processing);
        }
        catch (ArgumentException e)
        {
            throw new SpectrumFileException(Fid.Origin.Source, null, $"the FID cannot be processed as asked: {e.Message}", e);
        }
    }
}
