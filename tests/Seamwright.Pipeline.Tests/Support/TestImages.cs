using SixLabors.ImageSharp;
using SixLabors.ImageSharp.PixelFormats;

namespace Seamwright.Tests.Support;

/// <summary>Small synthetic images and scratch folders for the service tests.</summary>
internal static class TestImages
{
    /// <summary>A deterministic 8-bit gray PNG of blocks and gradients; <paramref name="seed"/> varies the content.</summary>
    public static byte[] Png(int seed, int width = 64, int height = 64)
    {
        using var img = new Image<L8>(width, height);
        ulong s = (ulong)seed * 0x9E3779B97F4A7C15UL + 1;
        for (int y = 0; y < height; y++)
        {
            for (int x = 0; x < width; x++)
            {
                s ^= s << 13;
                s ^= s >> 7;
                s ^= s << 17;
                int block = ((x / 8) * 31 + (y / 8) * 17 + seed * 7) % 200;
                img[x, y] = new L8((byte)(block + (int)(s % 40)));
            }
        }
        using var ms = new MemoryStream();
        img.SaveAsPng(ms);
        return ms.ToArray();
    }

    public static void WriteSet(string folder, int count, int seedBase, string prefix = "img", string ext = ".png")
    {
        Directory.CreateDirectory(folder);
        for (int i = 0; i < count; i++)
        {
            File.WriteAllBytes(Path.Combine(folder, $"{prefix}{i + 1:D3}{ext}"), Png(seedBase + i));
        }
    }

    /// <summary>SHA-256 of every file under a folder, by relative path (to prove inputs are untouched).</summary>
    public static Dictionary<string, string> Hashes(string folder) =>
        Directory.EnumerateFiles(folder, "*", SearchOption.AllDirectories)
            .ToDictionary(f => Path.GetRelativePath(folder, f), f => Convert.ToHexString(System.Security.Cryptography.SHA256.HashData(File.ReadAllBytes(f))));
}

/// <summary>A temporary folder removed at dispose.</summary>
internal sealed class ScratchFolder : IDisposable
{
    public ScratchFolder()
    {
        Path = System.IO.Path.Combine(System.IO.Path.GetTempPath(), "seamwright-tests", Guid.NewGuid().ToString("N")[..12]);
        Directory.CreateDirectory(Path);
    }

    public string Path { get; }

    public string Sub(string name) => System.IO.Path.Combine(Path, name);

    public void Dispose()
    {
        try
        {
            Directory.Delete(Path, recursive: true);
        }
        catch (IOException)
        {
        }
        catch (UnauthorizedAccessException)
        {
        }
    }
}
