namespace Seamwright.Core.Imaging;

/// <summary>
/// The eight EXIF orientations (tag 0x0112; Exif 2.32, CIPA DC-008, section 4.6.4 table 4):
/// how the stored pixels must be turned to show the image upright. Values outside 1..8 are
/// treated as 1. Mapping of a stored pixel (x, y) of a W x H image to the displayed image:
/// 1 (x, y); 2 (W-1-x, y); 3 (W-1-x, H-1-y); 4 (x, H-1-y); 5 (y, x); 6 (H-1-y, x);
/// 7 (H-1-y, W-1-x); 8 (y, W-1-x). Orientations 5 to 8 swap width and height.
/// </summary>
public static class ExifOrientation
{
    public static int Normalize(int orientation) => orientation is >= 1 and <= 8 ? orientation : 1;

    public static bool SwapsAxes(int orientation) => Normalize(orientation) >= 5;

    /// <summary>The orientation that undoes <paramref name="orientation"/>.</summary>
    public static int Inverse(int orientation) => Normalize(orientation) switch
    {
        6 => 8,
        8 => 6,
        var o => o,
    };

    /// <summary>Maps a stored pixel position to the displayed image.</summary>
    public static (int X, int Y) StoredToDisplay(int x, int y, int storedWidth, int storedHeight, int orientation)
    {
        int w = storedWidth;
        int h = storedHeight;
        return Normalize(orientation) switch
        {
            2 => (w - 1 - x, y),
            3 => (w - 1 - x, h - 1 - y),
            4 => (x, h - 1 - y),
            5 => (y, x),
            6 => (h - 1 - y, x),
            7 => (h - 1 - y, w - 1 - x),
            8 => (y, w - 1 - x),
            _ => (x, y),
        };
    }

    /// <summary>Turns stored pixels upright; returns the same instance for orientation 1.</summary>
    public static GrayImage ToDisplay(GrayImage stored, int orientation)
    {
        ArgumentNullException.ThrowIfNull(stored);
        int o = Normalize(orientation);
        if (o == 1)
        {
            return stored;
        }
        int w = stored.Width;
        int h = stored.Height;
        var display = SwapsAxes(o) ? new GrayImage(h, w) : new GrayImage(w, h);
        byte[] src = stored.Pixels;
        byte[] dst = display.Pixels;
        int dw = display.Width;
        for (int y = 0; y < h; y++)
        {
            int rowStart = y * w;
            for (int x = 0; x < w; x++)
            {
                var (dx, dy) = StoredToDisplay(x, y, w, h, o);
                dst[dy * dw + dx] = src[rowStart + x];
            }
        }
        return display;
    }

    /// <summary>The stored pixels that show as <paramref name="display"/> under <paramref name="orientation"/>.</summary>
    public static GrayImage ToStored(GrayImage display, int orientation) => ToDisplay(display, Inverse(orientation));
}
