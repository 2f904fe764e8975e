using System.Text.Json;
using Seamwright.Core.Estimation;
using Seamwright.Host.Supervision;
using Seamwright.Pipeline.Analysis;
using Seamwright.Pipeline.Preview;
using Seamwright.Pipeline.Settings;

namespace Seamwright.Host.Service;

/// <summary>
/// The service's pair engine with image analysis moved into supervised worker processes: the
/// worker decodes and extracts features and writes the engine's cache encoding to a temporary
/// file in the state folder, which is read back and deleted here. A file the worker rejects,
/// or that is quarantined after killing workers, becomes an <see cref="ImageRejectedException"/>
/// with the reason, so the set proceeds without it. Pair estimation stays in this process.
/// </summary>
internal sealed class SupervisedEngine(IPairEngine inner, DecodeSupervisor supervisor, string scratchFolder) : IPairEngine
{
    public string Name => inner.Name;

    public string DescriptorVersion => inner.DescriptorVersion;

    public int AlgorithmVersion => inner.AlgorithmVersion;

    public ImageAnalysis Analyze(string path, FeatureSettings features, LimitSettings limits, MemoryBudget budget, CancellationToken cancel)
    {
        Directory.CreateDirectory(scratchFolder);
        string output = Path.Combine(scratchFolder, Guid.NewGuid().ToString("N") + ".analysis");
        var spec = new WorkerJobSpec(inner.Name, JsonSerializer.Serialize(features), JsonSerializer.Serialize(limits));
        try
        {
            // Analyze is synchronous in the set processor; this blocks one set-worker thread,
            // as the in-process decode did.
            var outcome = supervisor.DecodeAsync(path, cancel, output, spec).GetAwaiter().GetResult();
            return outcome.Status switch
            {
                DecodeStatus.Decoded => inner.Decode(File.ReadAllBytes(output)),
                _ => throw new ImageRejectedException(outcome.Reason ?? outcome.Status.ToString()),
            };
        }
        finally
        {
            File.Delete(output);
        }
    }

    public byte[] Encode(ImageAnalysis analysis) => inner.Encode(analysis);

    public ImageAnalysis Decode(ReadOnlySpan<byte> data) => inner.Decode(data);

    public PairAnalysis EstimatePair(ImageAnalysis a, ImageAnalysis b, EstimationSettings settings, ulong seed) =>
        inner.EstimatePair(a, b, settings, seed);

    public bool HasSecondLook => inner.HasSecondLook;

    /// <summary>
    /// The preview's images are opened in the supervised workers too (<see cref="PreviewJob"/>),
    /// so no image is decoded in the service process; a file a worker cannot open gives null.
    /// </summary>
    public PreviewImageOpener PreviewOpener(IReadOnlyList<string> paths, LimitSettings limits, MemoryBudget budget)
    {
        string limitsJson = JsonSerializer.Serialize(limits);
        return (index, maxLongSide) =>
        {
            Directory.CreateDirectory(scratchFolder);
            string output = Path.Combine(scratchFolder, Guid.NewGuid().ToString("N") + ".preview");
            try
            {
                var outcome = supervisor.DecodeAsync(paths[index], CancellationToken.None, output, new WorkerJobSpec(inner.Name, "{}", limitsJson, maxLongSide))
                    .GetAwaiter().GetResult();
                return outcome.Status == DecodeStatus.Decoded ? PreviewPixels.Read(File.ReadAllBytes(output)) : null;
            }
            finally
            {
                File.Delete(output);
            }
        };
    }
}
