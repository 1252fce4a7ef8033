namespace SpinSim.Core.Units;

/// <summary>A chemical shift in ppm relative to the reference (TMS for 1H and 13C). Higher ppm is higher frequency.</summary>
public readonly record struct ShiftPpm(double Value)
{
    public override string ToString() => $"{Value:0.#####} ppm";
}

/// <summary>A frequency offset in Hz in the rotating frame, 0 Hz at 0 ppm of the observed nucleus.</summary>
public readonly record struct FrequencyHz(double Value)
{
    public override string ToString() => $"{Value:0.####} Hz";
}

/// <summary>A signed scalar coupling constant J in Hz.</summary>
public readonly record struct CouplingHz(double Value)
{
    public override string ToString() => $"{Value:0.####} Hz";
}

/// <summary>A full width at half maximum in Hz.</summary>
public readonly record struct WidthHz(double Value)
{
    public override string ToString() => $"{Value:0.####} Hz";
}

/// <summary>
/// Spectrometer field stated as the 1H observe frequency in MHz (a "400 MHz instrument").
/// For 1H, 1 ppm equals <see cref="Value"/> Hz.
/// </summary>
public readonly record struct FieldMHz(double Value)
{
    /// <summary>Proton gyromagnetic ratio over 2 pi in MHz/T, CODATA 2018 recommended value (42.577 478 518 MHz/T).</summary>
    public const double ProtonGammaOver2PiMHzPerTesla = 42.577478518;

    public static FieldMHz FromTesla(double tesla) => new(tesla * ProtonGammaOver2PiMHzPerTesla);

    public double Tesla => Value / ProtonGammaOver2PiMHzPerTesla;

    /// <summary>nu [Hz] = delta [ppm] x SF [MHz] for the nucleus whose frequency is <paramref name="observeMHz"/>.</summary>
    public static FrequencyHz ToHz(ShiftPpm shift, double observeMHz) => new(shift.Value * observeMHz);

    public static ShiftPpm ToPpm(FrequencyHz frequency, double observeMHz) => new(frequency.Value / observeMHz);

    public FrequencyHz ToHz(ShiftPpm shift) => ToHz(shift, Value);

    public ShiftPpm ToPpm(FrequencyHz frequency) => ToPpm(frequency, Value);

    public override string ToString() => $"{Value:0.###} MHz";
}
