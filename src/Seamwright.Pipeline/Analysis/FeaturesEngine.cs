using System.Buffers.Binary;
using System.Globalization;
using Seamwright.Core.Estimation;
using Seamwright.Core.Features;
using Seamwright.Core.Imaging;
using Seamwright.Core.Matching;
using Seamwright.Pipeline.Features;
using Seamwright.Pipeline.Loading;
using Seamwright.Pipeline.Pairs;
using SixLabors.ImageSharp;
using SixLabors.ImageSharp.Metadata.Profiles.Exif;
using Settings = Seamwright.Pipeline.Settings;

namespace Seamwright.Pipeline.Analysis;

/// <summary>
/// The real engine ("features"): the image loader with its limits, corner features with the
/// project's binary descriptor, and the pair processor (matching, seeded sampling, consensus
/// refinement, full-resolution re-localisation, decision). The cache entry holds the coarse
/// signature and capture time followed by the features in the features' own cache codec.
/// </summary>
public sealed class FeaturesEngine : IPairEngine
{
    private static readonly byte[] Magic = "SWEA"u8.ToArray();

    public string Name => "features";

    public string DescriptorVersion => DescriptorPattern.Version;

    /// <summary>Bump when this engine's results change for the same inputs and settings.</summary>
    public int AlgorithmVersion => 3;

    public ImageAnalysis Analyze(string path, Settings.FeatureSettings features, Settings.LimitSettings limits, MemoryBudget budget, CancellationToken cancel)
    {
        ArgumentNullException.ThrowIfNull(features);
        ArgumentNullException.ThrowIfNull(limits);
        ArgumentNullException.ThrowIfNull(budget);
        var loader = new ImageLoader(LoadLimits.From(limits));
        LoadedImage loaded;
        try
        {
            var header = loader.Probe(path);
            // The decode holds colour planes of about 4 bytes per pixel before the gray conversion.
            using var reservation = budget.Reserve(header.StoredSize.PixelCount * 4, cancel);
            cancel.ThrowIfCancellationRequested();
            loaded = loader.Load(path);
        }
        catch (ImageLoadException e)
        {
            throw new ImageRejectedException(e.Reason, e);
        }
        var image = loaded.Image;
        var mask = Mask(features, image.Width, image.Height);
        var extracted = ImageFeatureExtractor.Extract(image, mask, ToFeatureSettings(features));
        return new ImageAnalysis
        {
            Size = extracted.FullSize,
            Coarse = Coarse(image),
            CaptureTime = CaptureTime(path),
            Payload = extracted,
        };
    }

    public byte[] Encode(ImageAnalysis analysis)
    {
        ArgumentNullException.ThrowIfNull(analysis);
        using var ms = new MemoryStream();
        Span<byte> head = stackalloc byte[4 + 8 + 4];
        Magic.CopyTo(head);
        BinaryPrimitives.WriteInt64LittleEndian(head[4..], analysis.CaptureTime?.UtcTicks ?? -1);
        BinaryPrimitives.WriteInt32LittleEndian(head[12..], analysis.Coarse.Length);
        ms.Write(head);
        Span<byte> f = stackalloc byte[4];
        foreach (float v in analysis.Coarse)
        {
            BinaryPrimitives.WriteSingleLittleEndian(f, v);
            ms.Write(f);
        }
        FeatureCacheCodec.Write(ms, (ImageFeatures)analysis.Payload);
        return ms.ToArray();
    }

    public ImageAnalysis Decode(ReadOnlySpan<byte> data)
    {
        if (data.Length < 16 || !data[..4].SequenceEqual(Magic))
        {
            throw new InvalidDataException("not a features-engine cache entry");
        }
        long ticks = BinaryPrimitives.ReadInt64LittleEndian(data[4..]);
        int n = BinaryPrimitives.ReadInt32LittleEndian(data[12..]);
        if (n < 0 || n > 4096 || data.Length < 16 + 4 * n)
        {
            throw new InvalidDataException("damaged features-engine cache entry");
        }
        var coarse = new float[n];
        for (int i = 0; i < n; i++)
        {
            coarse[i] = BinaryPrimitives.ReadSingleLittleEndian(data[(16 + 4 * i)..]);
        }
        using var ms = new MemoryStream(data[(16 + 4 * n)..].ToArray());
        var features = FeatureCacheCodec.Read(ms);
        return new ImageAnalysis
        {
            Size = features.FullSize,
            Coarse = coarse,
            CaptureTime = ticks < 0 ? null : new DateTimeOffset(ticks, TimeSpan.Zero),
            Payload = features,
        };
    }

    public bool HasSecondLook => true;

    public PairAnalysis EstimatePair(ImageAnalysis a, ImageAnalysis b, Settings.EstimationSettings settings, ulong seed)
    {
        ArgumentNullException.ThrowIfNull(a);
        ArgumentNullException.ThrowIfNull(b);
        ArgumentNullException.ThrowIfNull(settings);
        var pair = new PairSettings
        {
            Estimation = EstimationOptions.Default with
            {
                Model = settings.MotionModel,
                Threshold = settings.ThresholdPx,
                Seed = seed,
                Refine = settings.RefineConsensus,
                Confidence = settings.Confidence,
                MaxIterations = settings.MaxIterations,
            },
            Matching = new MatchOptions { MaxRatio = settings.RatioTest },
            ScaleSpace = settings.ScaleSpaceLook ? new ScaleSpaceLook { AffineViews = settings.AffineViews } : null,
        };
        var outcome = PairProcessor.Process((ImageFeatures)a.Payload, (ImageFeatures)b.Payload, pair);
        return new PairAnalysis(outcome.Estimate, outcome.TiePoints);
    }

    public static FeatureSettings ToFeatureSettings(Settings.FeatureSettings s)
    {
        ArgumentNullException.ThrowIfNull(s);
        return FeatureSettings.Default with
        {
            AnalysisPixelBudget = (long)(s.AnalysisMegapixels * 1e6),
            Detector = FeatureSettings.Default.Detector with { MaxFeatures = s.MaxKeypoints },
        };
    }

    /// <summary>Configured masks are fractions of the image; the features take pixel rectangles of the image as displayed.</summary>
    private static FeatureMask? Mask(Settings.FeatureSettings s, int width, int height)
    {
        if (s.Masks.Count == 0)
        {
            return null;
        }
        var rects = s.Masks.Select(m => new MaskRectangle(
            (int)Math.Floor(m.X * width), (int)Math.Floor(m.Y * height),
            Math.Max(1, (int)Math.Ceiling(m.Width * width)), Math.Max(1, (int)Math.Ceiling(m.Height * height)))).ToList();
        return new FeatureMask(rects);
    }

    /// <summary>Coarse signature of a thumbnail about 64 pixels on its long side (box-averaged).</summary>
    private static float[] Coarse(GrayImage image)
    {
        int step = Math.Max(1, Math.Max(image.Width, image.Height) / 64);
        int w = Math.Max(1, image.Width / step), h = Math.Max(1, image.Height / step);
        var thumb = new byte[w * h];
        for (int y = 0; y < h; y++)
        {
            for (int x = 0; x < w; x++)
            {
                int sum = 0;
                for (int v = 0; v < step; v++)
                {
                    var row = image.Row(y * step + v);
                    for (int u = 0; u < step; u++)
                    {
                        sum += row[x * step + u];
                    }
                }
                thumb[y * w + x] = (byte)(sum / (step * step));
            }
        }
        return CoarseSignature.FromGray(thumb, w, h);
    }

    private static DateTimeOffset? CaptureTime(string path)
    {
        try
        {
            var value = Image.Identify(path)?.Metadata.ExifProfile?.GetValue(ExifTag.DateTimeOriginal)?.Value;
            return value is not null && DateTime.TryParseExact(value.Trim('\0', ' '), "yyyy:MM:dd HH:mm:ss", CultureInfo.InvariantCulture,
                DateTimeStyles.AssumeUniversal | DateTimeStyles.AdjustToUniversal, out var t)
                ? new DateTimeOffset(t, TimeSpan.Zero)
                : null;
        }
        catch (Exception e) when (e is IOException or UnknownImageFormatException or InvalidImageContentException or NotSupportedException)
        {
            return null; // the loader already accepted the file; a metadata problem only loses the capture time
        }
    }
}
