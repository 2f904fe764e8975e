using Seamwright.Core.Alignment;
using Seamwright.Core.Geometry;

namespace Seamwright.Core.Cameras;

/// <summary>
/// How far each placed image of a set model can reach, as a cheap bound that rules out pairs
/// before <see cref="OverlapPrediction"/> samples their shared area. Planar sets: the box around
/// the image's four corners on the reference plane (a transform with w &gt; 0 at the corners maps
/// the whole rectangle to the convex quadrilateral of their images, so any point one image shares
/// with another lies in both boxes). Rotation sets: the cone around the optical axis through the
/// corner rays, widened by <see cref="ConeMarginDeg"/> (with the principal point at the centre the
/// corners are the rays farthest from the axis; a ray drawn inside the image lies within the
/// lens polynomial's monotone range, so within the cone). A pair whose reaches do not meet shares
/// nothing; the bound never rules out a pair the sampling would find.
/// </summary>
public sealed class OverlapReach
{
    /// <summary>Widening of each camera's cone (judgement: covers rounding and the fold's edge).</summary>
    public const double ConeMarginDeg = 5;

    private readonly int _count;
    private readonly bool _rotation;
    private readonly bool[] _placed;
    private readonly bool[] _unbounded;
    private readonly int?[] _component;
    private readonly double[] _minX, _minY, _maxX, _maxY;
    private readonly (double X, double Y, double Z)[] _axis;
    private readonly double[] _halfAngle;

    private OverlapReach(int count, bool rotation)
    {
        _count = count;
        _rotation = rotation;
        _placed = new bool[count];
        _unbounded = new bool[count];
        _component = new int?[count];
        _minX = new double[count];
        _minY = new double[count];
        _maxX = new double[count];
        _maxY = new double[count];
        _axis = new (double, double, double)[count];
        _halfAngle = new double[count];
    }

    /// <summary>The reach of every image of <paramref name="result"/>.</summary>
    public static OverlapReach Of(SetModelResult result, IReadOnlyList<ImageSize> sizes)
    {
        ArgumentNullException.ThrowIfNull(result);
        ArgumentNullException.ThrowIfNull(sizes);
        var reach = new OverlapReach(sizes.Count, result.Rotation is not null);
        for (int i = 0; i < sizes.Count; i++)
        {
            if (result.Rotation is { } rotation)
            {
                reach.SetCone(i, rotation.Poses[i], sizes[i]);
            }
            else
            {
                reach.SetBox(i, result.Alignment.Images[i], sizes[i]);
            }
        }
        return reach;
    }

    /// <summary>False when the two images certainly share nothing (or either is not placed).</summary>
    public bool MayMeet(int a, int b)
    {
        if (!_placed[a] || !_placed[b])
        {
            return false;
        }
        if (_rotation)
        {
            var (ax, ay, az) = _axis[a];
            var (bx, by, bz) = _axis[b];
            double cos = Math.Clamp(ax * bx + ay * by + az * bz, -1, 1);
            return Math.Acos(cos) <= _halfAngle[a] + _halfAngle[b];
        }
        if (_component[a] != _component[b])
        {
            return false;
        }
        return _unbounded[a] || _unbounded[b]
            || (_minX[a] <= _maxX[b] && _minX[b] <= _maxX[a] && _minY[a] <= _maxY[b] && _minY[b] <= _maxY[a]);
    }

    /// <summary>Every pair (a &lt; b) whose reaches meet, in index order.</summary>
    public List<(int A, int B)> Candidates()
    {
        var pairs = new List<(int A, int B)>();
        if (_rotation)
        {
            for (int a = 0; a < _count; a++)
            {
                for (int b = a + 1; b < _count; b++)
                {
                    if (MayMeet(a, b))
                    {
                        pairs.Add((a, b));
                    }
                }
            }
            return pairs;
        }
        // Planar: sweep the boxes in order of their left edge; unbounded images meet every placed one of their component.
        var order = Enumerable.Range(0, _count).Where(i => _placed[i] && !_unbounded[i]).OrderBy(i => _minX[i]).ThenBy(i => i).ToArray();
        for (int k = 0; k < order.Length; k++)
        {
            int a = order[k];
            for (int m = k + 1; m < order.Length && _minX[order[m]] <= _maxX[a]; m++)
            {
                int b = order[m];
                if (MayMeet(a, b))
                {
                    pairs.Add((Math.Min(a, b), Math.Max(a, b)));
                }
            }
        }
        for (int a = 0; a < _count; a++)
        {
            if (_placed[a] && _unbounded[a])
            {
                for (int b = 0; b < _count; b++)
                {
                    if (b != a && MayMeet(a, b) && !(_unbounded[b] && b < a))
                    {
                        pairs.Add((Math.Min(a, b), Math.Max(a, b)));
                    }
                }
            }
        }
        pairs.Sort();
        return pairs;
    }

    private void SetBox(int i, ImagePlacement image, ImageSize size)
    {
        if (image.ToReference is not { } t)
        {
            return;
        }
        _placed[i] = true;
        _component[i] = image.Component;
        double minX = double.PositiveInfinity, minY = double.PositiveInfinity, maxX = double.NegativeInfinity, maxY = double.NegativeInfinity;
        foreach (var (x, y) in PixelBounds(size))
        {
            if (!(t.W(x, y) > 0) || !t.TryApply(x, y, out double u, out double v) || !double.IsFinite(u) || !double.IsFinite(v))
            {
                _unbounded[i] = true;
                return;
            }
            minX = Math.Min(minX, u);
            minY = Math.Min(minY, v);
            maxX = Math.Max(maxX, u);
            maxY = Math.Max(maxY, v);
        }
        // A hair wider than the corners: the sampling's inside test includes the edge.
        double pad = 1e-9 * Math.Max(1, Math.Max(Math.Abs(minX) + Math.Abs(maxX), Math.Abs(minY) + Math.Abs(maxY)));
        (_minX[i], _minY[i], _maxX[i], _maxY[i]) = (minX - pad, minY - pad, maxX + pad, maxY + pad);
    }

    private void SetCone(int i, CameraPose? pose, ImageSize size)
    {
        if (pose is null)
        {
            return;
        }
        _placed[i] = true;
        var axis = pose.Rotation.Apply(0, 0, 1);
        _axis[i] = axis;
        double fold = pose.Distortion.MonotoneRadiusSquared;
        double foldSeen = double.IsFinite(fold) ? Math.Sqrt(fold) * pose.Distortion.Factor(fold) : double.PositiveInfinity;
        double half = 0;
        foreach (var (x, y) in PixelBounds(size))
        {
            double dx = (x - pose.Cx) / pose.FocalPx, dy = (y - pose.Cy) / pose.FocalPx;
            if (Math.Sqrt(dx * dx + dy * dy) >= foldSeen)
            {
                // The corner lies beyond the largest radius the lens polynomial draws: no bound.
                _halfAngle[i] = Math.PI;
                return;
            }
            var (rx, ry, rz) = pose.Ray(x, y);
            half = Math.Max(half, Math.Acos(Math.Clamp(rx * axis.X + ry * axis.Y + rz * axis.Z, -1, 1)));
        }
        _halfAngle[i] = Math.Min(Math.PI, half + ConeMarginDeg * Math.PI / 180);
    }

    /// <summary>The corners of the area the sampling's inside test accepts ([-0.5, size - 0.5] each way).</summary>
    private static (double X, double Y)[] PixelBounds(ImageSize size) =>
        [(-0.5, -0.5), (size.Width - 0.5, -0.5), (size.Width - 0.5, size.Height - 0.5), (-0.5, size.Height - 0.5)];
}
