using System.Runtime.InteropServices;
using SkiaSharp;

namespace SpinSim.Figures.Rendering;

/// <summary>
/// The bundled font cut down to the characters a figure uses, for PDF output: Skia embeds the typeface it draws with
/// whole, which puts most of DejaVu Sans (about 0.4 MB) into every PDF. HarfBuzz's subsetter (hb_subset, in the
/// libHarfBuzzSharp native library that SkiaSharp.HarfBuzz already ships) keeps the glyphs of those characters only.
/// </summary>
internal static class FontSubset
{
    private const string Library = "libHarfBuzzSharp";

    /// <summary>A typeface with the glyphs of <paramref name="codepoints"/> only, or null when the subsetter is missing or fails (the caller keeps the whole font).</summary>
    public static SKTypeface? Create(byte[] font, IEnumerable<int> codepoints)
    {
        try
        {
            var handle = GCHandle.Alloc(font, GCHandleType.Pinned);
            IntPtr blob = IntPtr.Zero, face = IntPtr.Zero, input = IntPtr.Zero, subset = IntPtr.Zero, subsetBlob = IntPtr.Zero;
            try
            {
                blob = hb_blob_create(handle.AddrOfPinnedObject(), (uint)font.Length, 1 /* read-only */, IntPtr.Zero, IntPtr.Zero);
                face = hb_face_create(blob, 0);
                input = hb_subset_input_create_or_fail();
                if (input == IntPtr.Zero) return null;
                var unicodes = hb_subset_input_unicode_set(input);
                foreach (var c in codepoints.Append(' ').Append('?')) hb_set_add(unicodes, (uint)c);
                subset = hb_subset_or_fail(face, input);
                if (subset == IntPtr.Zero) return null;
                subsetBlob = hb_face_reference_blob(subset);
                var data = hb_blob_get_data(subsetBlob, out var length);
                if (data == IntPtr.Zero || length == 0) return null;
                var bytes = new byte[length];
                Marshal.Copy(data, bytes, 0, (int)length);
                return SKTypeface.FromData(SKData.CreateCopy(bytes));
            }
            finally
            {
                if (subsetBlob != IntPtr.Zero) hb_blob_destroy(subsetBlob);
                if (subset != IntPtr.Zero) hb_face_destroy(subset);
                if (input != IntPtr.Zero) hb_subset_input_destroy(input);
                if (face != IntPtr.Zero) hb_face_destroy(face);
                if (blob != IntPtr.Zero) hb_blob_destroy(blob);
                handle.Free();
            }
        }
        catch (Exception e) when (e is DllNotFoundException or EntryPointNotFoundException)
        {
            return null;
        }
    }

    [DllImport(Library)] private static extern IntPtr hb_blob_create(IntPtr data, uint length, int mode, IntPtr userData, IntPtr destroy);
    [DllImport(Library)] private static extern void hb_blob_destroy(IntPtr blob);
    [DllImport(Library)] private static extern IntPtr hb_blob_get_data(IntPtr blob, out uint length);
    [DllImport(Library)] private static extern IntPtr hb_face_create(IntPtr blob, uint index);
    [DllImport(Library)] private static extern void hb_face_destroy(IntPtr face);
    [DllImport(Library)] private static extern IntPtr hb_face_reference_blob(IntPtr face);
    [DllImport(Library)] private static extern IntPtr hb_subset_input_create_or_fail();
    [DllImport(Library)] private static extern void hb_subset_input_destroy(IntPtr input);
    [DllImport(Library)] private static extern IntPtr hb_subset_input_unicode_set(IntPtr input);
    [DllImport(Library)] private static extern void hb_set_add(IntPtr set, uint codepoint);
    [DllImport(Library)] private static extern IntPtr hb_subset_or_fail(IntPtr face, IntPtr input);
}
