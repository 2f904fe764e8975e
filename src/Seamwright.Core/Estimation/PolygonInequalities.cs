using Seamwright.Core.Geometry;

namespace Seamwright.Core.Estimation;

/// <summary>
/// The forward transfer test ||H(p) - q|| &lt;= t written as linear inequalities in the model
/// parameters (Cai, Chin, Le, Suter, ECCV 2018). With h33 = 1 and w = h31 x + h32 y + 1, the
/// residual (u - x' w, v - y' w) must lie in the regular K-gon inscribed in the disc of radius
/// t w; edge k gives c_k (u - x' w) + s_k (v - y' w) - t cos(pi / K) w &lt;= slack. Every datum that
/// meets all K rows with zero slack and w &gt; 0 is a true inlier, because the polygon lies inside
/// the disc. For the affine family w = 1 and only the first rows of H are parameters.
/// Everything is in Hartley-normalised coordinates; a threshold of t pixels in the second
/// image becomes t * s2 normalised units, s2 being the second image's normalisation scale.
/// </summary>
internal sealed class PolygonInequalities
{
    /// <summary>Relative inward margin of the polygon, so solver round-off on a vertex stays inside the disc.</summary>
    private const double RadiusMargin = 1e-6;

    private readonly double[] _rowCoefficients;
    private readonly double[] _rowConstants;
    private readonly double[] _depthCoefficients;
    private readonly HartleyNormalization _first;
    private readonly HartleyNormalization _second;
    private readonly double _translationScale;
    private readonly MotionFamily _family;

    public PolygonInequalities(ReadOnlySpan<Correspondence> matches, MotionModel model, double threshold, int sides, double tau)
    {
        if (sides < 8)
        {
            throw new ArgumentOutOfRangeException(nameof(sides), sides, "The inscribed polygon needs at least 8 sides.");
        }
        if (!(threshold > 0) || !double.IsFinite(threshold))
        {
            throw new ArgumentOutOfRangeException(nameof(threshold), threshold, "The threshold must be a positive number of pixels.");
        }
        Model = model;
        _family = MotionFamily.Of(model);
        Count = matches.Length;
        Sides = sides;
        Tau = tau;
        ParameterCount = _family.ParameterCount;
        (_first, _second) = HartleyNormalization.ForMatches(matches);
        _translationScale = _second.Scale / _first.Scale;
        Radius = threshold * _second.Scale * Math.Cos(Math.PI / sides) * (1 - RadiusMargin);

        int p = ParameterCount;
        _rowCoefficients = new double[Count * sides * p];
        _rowConstants = new double[Count * sides];
        _depthCoefficients = new double[HasDepth ? Count * p : 0];
        Span<double> uc = stackalloc double[p], vc = stackalloc double[p], wc = stackalloc double[p];
        for (int i = 0; i < Count; i++)
        {
            var (x, y) = _first.Apply(matches[i].X1, matches[i].Y1);
            var (xp, yp) = _second.Apply(matches[i].X2, matches[i].Y2);
            double u0 = 0, v0 = 0;
            uc.Clear(); vc.Clear(); wc.Clear();
            _family.LinearRows(x, y, _translationScale, uc, vc, wc, ref u0, ref v0);
            if (HasDepth)
            {
                wc.CopyTo(_depthCoefficients.AsSpan(i * p, p));
            }
            for (int k = 0; k < sides; k++)
            {
                double angle = 2 * Math.PI * k / sides;
                double c = Math.Cos(angle), s = Math.Sin(angle);
                var row = _rowCoefficients.AsSpan((i * sides + k) * p, p);
                for (int j = 0; j < p; j++)
                {
                    row[j] = c * (uc[j] - xp * wc[j]) + s * (vc[j] - yp * wc[j]) - Radius * wc[j];
                }
                // w0 = 1 for every model: the constant part of w.
                _rowConstants[i * sides + k] = c * (u0 - xp) + s * (v0 - yp) - Radius;
            }
        }
    }

    public MotionModel Model { get; }

    /// <summary>Number of data (matches).</summary>
    public int Count { get; }

    public int Sides { get; }

    public int ParameterCount { get; }

    /// <summary>Lower bound on w at active data (normalised units).</summary>
    public double Tau { get; }

    /// <summary>Inscribed polygon's inner radius t s2 cos(pi / K), in normalised units.</summary>
    public double Radius { get; }

    /// <summary>True for the homography, whose w depends on the parameters.</summary>
    public bool HasDepth => _family.HasDepth;

    /// <summary>Coefficients of row (datum i, side k) over the parameters; the row reads a . theta + b &lt;= slack.</summary>
    public ReadOnlySpan<double> RowCoefficients(int datum, int side) =>
        _rowCoefficients.AsSpan((datum * Sides + side) * ParameterCount, ParameterCount);

    public double RowConstant(int datum, int side) => _rowConstants[datum * Sides + side];

    /// <summary>Coefficients of w over the parameters (w = d . theta + 1); empty for the affine family.</summary>
    public ReadOnlySpan<double> DepthCoefficients(int datum) =>
        HasDepth ? _depthCoefficients.AsSpan(datum * ParameterCount, ParameterCount) : [];

    /// <summary>Least slack that satisfies all K rows of a datum under theta.</summary>
    public double Slack(int datum, ReadOnlySpan<double> theta)
    {
        double worst = 0;
        for (int k = 0; k < Sides; k++)
        {
            var a = RowCoefficients(datum, k);
            double e = RowConstant(datum, k);
            for (int j = 0; j < a.Length; j++)
            {
                e += a[j] * theta[j];
            }
            worst = Math.Max(worst, e);
        }
        return worst;
    }

    /// <summary>w of a datum under theta (1 for the affine family).</summary>
    public double Depth(int datum, ReadOnlySpan<double> theta)
    {
        if (!HasDepth)
        {
            return 1;
        }
        var d = DepthCoefficients(datum);
        double w = 1;
        for (int j = 0; j < d.Length; j++)
        {
            w += d[j] * theta[j];
        }
        return w;
    }

    /// <summary>Slack plus the weighted shortfall of w below tau: the datum's share of the LP objective.</summary>
    public double Cost(int datum, ReadOnlySpan<double> theta, double cheiralityCost) =>
        Slack(datum, theta) + cheiralityCost * Math.Max(0, Tau - Depth(datum, theta));

    /// <summary>The pixel transform (first image to second) of a parameter vector, scaled by a positive factor to |h33| = 1.</summary>
    public Transform2D ToPixel(ReadOnlySpan<double> theta)
    {
        var normalised = _family.FromLinearParameters(theta, _translationScale);
        var h = _second.InverseMatrix * normalised * _first.Matrix;
        return _family.ProjectPixel(h);
    }

    /// <summary>
    /// The parameter vector of a pixel transform (projected onto the model family; for the
    /// homography scaled to h33 = 1 in normalised coordinates). False when h33 there is not positive.
    /// </summary>
    public bool TryToParameters(in Transform2D transform, Span<double> theta)
    {
        var h = _second.Matrix * transform * _first.InverseMatrix;
        if (HasDepth)
        {
            if (!(h.M33 > 0))
            {
                return false;
            }
            h = h.Scale(1 / h.M33);
        }
        _family.ToParameters(h, theta);
        foreach (double v in theta[..ParameterCount])
        {
            if (!double.IsFinite(v))
            {
                return false;
            }
        }
        return true;
    }
}
