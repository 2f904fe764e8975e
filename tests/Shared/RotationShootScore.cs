using System.Globalization;
using System.Text.Json;
using Seamwright.Core.Cameras;
using Seamwright.Core.Synthetic;

namespace Seamwright.Tests.Shared;

/// <summary>
/// A set run's outputs scored against the truth of a <see cref="RotationShoot"/> (our renderer,
/// <c>Core/Synthetic/SphericalView</c>): frames with a sidecar camera block, the relative rotation
/// between every two placed frames against the truth (degrees), the worst focal length error
/// (fraction) and the worst k1 error, read from the sidecars and the manifest as a user would.
/// </summary>
internal sealed record RotationShootScore(string Set, string? SetModel, int Frames, int Placed, string[] Unplaced,
    double MedianDeg, double WorstDeg, double FocalError, double K1Error, double K1)
{
    public static RotationShootScore Read(RotationShoot shoot, string setOutput)
    {
        var rotations = new Matrix3?[shoot.Count];
        double focalError = 0, k1Error = 0, k1 = double.NaN;
        var unplaced = new List<string>();
        for (int i = 0; i < shoot.Count; i++)
        {
            string path = Path.Combine(setOutput, shoot.FileName(i) + ".seam.json");
            if (!File.Exists(path))
            {
                unplaced.Add(shoot.FileName(i));
                continue;
            }
            using var doc = JsonDocument.Parse(File.ReadAllBytes(path));
            if (!doc.RootElement.TryGetProperty("camera", out var camera) || camera.ValueKind != JsonValueKind.Object)
            {
                unplaced.Add(shoot.FileName(i));
                continue;
            }
            double[] m = [.. camera.GetProperty("rotation").EnumerateArray().SelectMany(r => r.EnumerateArray().Select(v => v.GetDouble()))];
            rotations[i] = Matrix3.FromRowMajor(m);
            focalError = Math.Max(focalError, Math.Abs(camera.GetProperty("focalPx").GetDouble() / shoot.FocalPx - 1));
            k1 = camera.GetProperty("distortion").GetProperty("k1").GetDouble();
            k1Error = Math.Max(k1Error, Math.Abs(k1 - shoot.Lens.K1));
        }
        var errors = new List<double>();
        for (int i = 0; i < shoot.Count; i++)
        {
            for (int j = i + 1; j < shoot.Count; j++)
            {
                if (rotations[i] is { } ri && rotations[j] is { } rj)
                {
                    var estimated = ri.Transpose() * rj;
                    var truth = shoot.Rotations[i].Transpose() * shoot.Rotations[j];
                    errors.Add(Matrix3.AngleBetween(estimated, truth) * 180 / Math.PI);
                }
            }
        }
        errors.Sort();
        string? model = null;
        string manifest = Path.Combine(setOutput, "seam-manifest.json");
        if (File.Exists(manifest))
        {
            using var doc = JsonDocument.Parse(File.ReadAllBytes(manifest));
            if (doc.RootElement.TryGetProperty("alignment", out var a) && a.ValueKind == JsonValueKind.Object
                && a.TryGetProperty("setModel", out var s) && s.ValueKind == JsonValueKind.Object)
            {
                model = s.GetProperty("model").GetString();
            }
        }
        return new RotationShootScore(shoot.Name, model, shoot.Count, shoot.Count - unplaced.Count, [.. unplaced],
            errors.Count == 0 ? double.NaN : errors[errors.Count / 2], errors.Count == 0 ? double.NaN : errors[^1],
            unplaced.Count == shoot.Count ? double.NaN : focalError, unplaced.Count == shoot.Count ? double.NaN : k1Error, k1);
    }

    public override string ToString() => string.Create(CultureInfo.InvariantCulture,
        $"{Set}: model {SetModel}, placed {Placed}/{Frames}{(Unplaced.Length > 0 ? " (not " + string.Join(", ", Unplaced) + ")" : "")}, relative rotation error median {MedianDeg:0.0000} deg, worst {WorstDeg:0.0000} deg, focal error {100 * FocalError:0.000} %, k1 {K1:0.0000} (error {K1Error:0.0000})");
}
