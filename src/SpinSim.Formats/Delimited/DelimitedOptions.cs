namespace SpinSim.Formats.Delimited;

/// <summary>What separates the columns of a delimited text file.</summary>
public enum ColumnSeparator
{
    /// <summary>Tab if the first line has one, else semicolon, else comma (with a decimal point), else blanks.</summary>
    Auto,
    Comma,
    Semicolon,
    Tab,

    /// <summary>One or more blanks or tabs.</summary>
    Whitespace,
}

/// <summary>The character written between the integer and fractional digits.</summary>
public enum DecimalMark
{
    Point,
    Comma,
}

/// <summary>The unit of the x column.</summary>
public enum DelimitedXUnit
{
    Ppm,

    /// <summary>Hz with 0 Hz at 0 ppm; needs <see cref="DelimitedOptions.ObserveMHz"/>.</summary>
    Hz,
}

/// <summary>
/// How to read a two-column (or wider) text file as a trace. Columns are chosen by header name when a
/// name is given, otherwise by 0-based index. Lines starting with '#' and blank lines are skipped.
/// </summary>
public sealed record DelimitedOptions
{
    public ColumnSeparator Separator { get; init; } = ColumnSeparator.Auto;

    /// <summary>True: the first line names the columns; false: it is data; null: a header is assumed when the first line is not all numbers.</summary>
    public bool? HasHeader { get; init; }

    /// <summary>
    /// The decimal mark. With <see cref="DecimalMark.Point"/> (the default) and columns separated by semicolons, tabs or
    /// blanks, numbers such as 7,26 are recognised as written with a decimal comma, and the reader says so.
    /// </summary>
    public DecimalMark DecimalMark { get; init; } = DecimalMark.Point;

    /// <summary>Header name of the x column (case-insensitive); when null, <see cref="XColumnIndex"/> is used.</summary>
    public string? XColumnName { get; init; }

    /// <summary>
    /// 0-based x column. When neither columns nor names are chosen (indices 0 and 1) and the first column counts points
    /// (0, 1, 2, ... or 1, 2, 3, ...) with at least two more columns, the reader takes columns 1 and 2 and says so.
    /// </summary>
    public int XColumnIndex { get; init; }

    /// <summary>Header name of the intensity column (case-insensitive); when null, <see cref="YColumnIndex"/> is used.</summary>
    public string? YColumnName { get; init; }

    public int YColumnIndex { get; init; } = 1;

    /// <summary>The x unit; null: Hz when the x column's header names Hz (such as "freq_Hz" or "Hz"), else ppm.</summary>
    public DelimitedXUnit? XUnit { get; init; }

    /// <summary>Observe frequency of the nucleus in MHz: required for x in Hz, optional (but kept) for x in ppm.</summary>
    public double? ObserveMHz { get; init; }

    /// <summary>Observed nucleus, e.g. "1H".</summary>
    public string Nucleus { get; init; } = "1H";
}
