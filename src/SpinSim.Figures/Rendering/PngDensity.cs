using System.Buffers.Binary;

namespace SpinSim.Figures.Rendering;

/// <summary>
/// Adds the physical pixel density to a PNG, which Skia's encoder leaves out, so that a 300 dpi figure
/// is placed at its intended size by word processors and typesetting tools.
/// PNG specification (W3C, 2nd edition, 2003), section 11.3.5.3 pHYs and annex D (CRC-32).
/// </summary>
internal static class PngDensity
{
    private const double MillimetresPerInch = 25.4;
    private static readonly uint[] CrcTable = BuildCrcTable();

    /// <summary>The PNG <paramref name="png"/> with a pHYs chunk of <paramref name="dpi"/> inserted after IHDR.</summary>
    public static byte[] WithDpi(byte[] png, double dpi)
    {
        // Signature (8 bytes), then IHDR: length (4), type (4), 13 data bytes, CRC (4).
        const int afterIhdr = 8 + 4 + 4 + 13 + 4;
        if (png.Length < afterIhdr || png[12] != (byte)'I' || png[13] != (byte)'H' || png[14] != (byte)'D' || png[15] != (byte)'R')
            throw new InvalidOperationException("the PNG encoder wrote an unexpected header; cannot record its density");

        var pixelsPerMetre = (uint)Math.Round(dpi / MillimetresPerInch * 1000);
        var chunk = new byte[4 + 4 + 9 + 4];
        BinaryPrimitives.WriteUInt32BigEndian(chunk, 9);
        "pHYs"u8.CopyTo(chunk.AsSpan(4));
        BinaryPrimitives.WriteUInt32BigEndian(chunk.AsSpan(8), pixelsPerMetre);
        BinaryPrimitives.WriteUInt32BigEndian(chunk.AsSpan(12), pixelsPerMetre);
        chunk[16] = 1; // unit: metre
        BinaryPrimitives.WriteUInt32BigEndian(chunk.AsSpan(17), Crc32(chunk.AsSpan(4, 13)));

        var result = new byte[png.Length + chunk.Length];
        png.AsSpan(0, afterIhdr).CopyTo(result);
        chunk.CopyTo(result.AsSpan(afterIhdr));
        png.AsSpan(afterIhdr).CopyTo(result.AsSpan(afterIhdr + chunk.Length));
        return result;
    }

    private static uint Crc32(ReadOnlySpan<byte> bytes)
    {
        var c = 0xFFFFFFFFu;
        foreach (var b in bytes) c = CrcTable[(c ^ b) & 0xFF] ^ (c >> 8);
        return c ^ 0xFFFFFFFFu;
    }

    private static uint[] BuildCrcTable()
    {
        var table = new uint[256];
        for (uint n = 0; n < 256; n++)
        {
            var c = n;
            for (var k = 0; k < 8; k++) c = (c & 1) != 0 ? 0xEDB88320u ^ (c >> 1) : c >> 1;
            table[n] = c;
        }
        return table;
    }
}
