namespace SpinSim.Core.Spectrum;

/// <summary>
/// One line to draw: centre in Hz from 0 ppm at the grid's field (delta [ppm] x SF [MHz]), area in the
/// caller's intensity units, and total full width at half maximum in Hz.
/// </summary>
public readonly record struct RenderLine(double CentreHz, double Area, double FwhmHz);
