namespace SpinSim.Core.Processing;

/// <summary>
/// Re-referencing: a line whose true shift is known (TMS at 0 ppm, a solvent residual) is set to that shift by moving the
/// whole ppm axis. The line is the tallest point within <see cref="SearchHalfWidthPpm"/> of where the user sees it,
/// refined by a parabola through it and its neighbours.
/// </summary>
public static class Referencing
{
    /// <summary>The line is looked for within this many ppm either side of the shift given for it.</summary>
    public const double SearchHalfWidthPpm = 0.1;

    /// <summary>
    /// <paramref name="trace"/> with every ppm moved so that the line found near <paramref name="seenPpm"/> lies at
    /// <paramref name="truePpm"/>; the step "reference" (found_ppm, set_ppm, shift_ppm) is appended to its processing record.
    /// </summary>
    /// <exception cref="ArgumentException">A value is not finite, or no point of the trace lies near <paramref name="seenPpm"/>.</exception>
    public static Traces.SpectrumTrace SetLine(Traces.SpectrumTrace trace, double seenPpm, double truePpm)
    {
        ArgumentNullException.ThrowIfNull(trace);
        if (!double.IsFinite(seenPpm) || !double.IsFinite(truePpm))
            throw new ArgumentException("the shifts of the reference line must be finite numbers of ppm");
        var found = FindLine(trace, seenPpm);
        var shift = truePpm - found;
        var ppm = new double[trace.Count];
        for (var i = 0; i < ppm.Length; i++) ppm[i] = trace.ShiftPpm[i] + shift;
        var record = (trace.Origin.Processing ?? new ProcessingRecord(ProcessingRecord.SpectrumKind, [])).With(
            new ProcessingStep(ProcessingRecord.ReferenceStepName, "a known line set to its shift",
                [new("found_ppm", found, "ppm"), new("set_ppm", truePpm, "ppm"), new("shift_ppm", shift, "ppm")]));
        return new Traces.SpectrumTrace(ppm, trace.Intensity, trace.ObserveMHz, trace.Nucleus, trace.Origin with { Processing = record });
    }

    /// <summary>The shift of the tallest point within the search window of <paramref name="seenPpm"/>, refined to between points.</summary>
    public static double FindLine(Traces.SpectrumTrace trace, double seenPpm)
    {
        var best = -1;
        for (var i = 0; i < trace.Count; i++)
            if (Math.Abs(trace.ShiftPpm[i] - seenPpm) <= SearchHalfWidthPpm && (best < 0 || trace.Intensity[i] > trace.Intensity[best]))
                best = i;
        if (best < 0)
            throw new ArgumentException(FormattableString.Invariant(
                $"no point of the trace lies within {SearchHalfWidthPpm} ppm of {seenPpm} ppm, where the reference line was said to be"));
        if (best == 0 || best == trace.Count - 1) return trace.ShiftPpm[best];
        double a = trace.Intensity[best - 1], b = trace.Intensity[best], c = trace.Intensity[best + 1];
        var curvature = a - 2 * b + c;
        if (!(curvature < 0)) return trace.ShiftPpm[best];
        var offset = 0.5 * (a - c) / curvature; // in points, towards the next index when positive
        var step = offset >= 0 ? trace.ShiftPpm[best + 1] - trace.ShiftPpm[best] : trace.ShiftPpm[best] - trace.ShiftPpm[best - 1];
        return trace.ShiftPpm[best] + offset * step;
    }
}
