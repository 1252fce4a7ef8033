namespace SpinSim.Tests.Figures;

/// <summary>A fact that needs pdftoppm (Debian's poppler-utils) to open a PDF, skipped with the reason when it is absent.</summary>
public sealed class PdfToolFactAttribute : FactAttribute
{
    public const string PdfToPpm = "/usr/bin/pdftoppm";

    public PdfToolFactAttribute()
    {
        if (!File.Exists(PdfToPpm))
            Skip = $"{PdfToPpm} not found: install poppler-utils to check that PDF figures open";
    }
}
