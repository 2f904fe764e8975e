using Seamwright.Core.Geometry;

namespace Seamwright.Core.Estimation;

/// <summary>
/// One motion model's home: everything that differs between models lives in its family
/// (<see cref="TranslationFamily"/>, <see cref="SimilarityFamily"/>, <see cref="AffineFamily"/>,
/// <see cref="HomographyFamily"/>), and the rest of the code asks the family instead of switching
/// on <see cref="MotionModel"/>. A family owns its name (the settings, command-line and JSON word),
/// its parameter count and minimal sample, its minimal and least-squares solvers, its
/// parameterisation (the parameter vector of the polish and the joint refinement, the rows of the
/// consensus refinement's linear program), its sanity rules and its place in the order of freedom.
/// Adding a model means adding a family class and one line in this registry (the only code that
/// maps the enum to families; <c>tests/Seamwright.Host.Tests/Conventions/MotionModelBranchTests</c>
/// keeps it that way).
/// </summary>
/// <remarks>
/// Parameterisation: each model is a linear parameterisation of the 3x3 matrix with h33 = 1 (every
/// parameter adds a fixed multiple of some entries), so one Levenberg-Marquardt and one covariance
/// serve all models through the chain rule d(u, v)/dp = d(u, v)/dH * dH/dp.
/// </remarks>
public abstract class MotionFamily
{
    private static readonly MotionFamily[] ByModel =
    [
        new TranslationFamily(MotionModel.Translation),
        new SimilarityFamily(MotionModel.Similarity),
        new AffineFamily(MotionModel.Affine),
        new HomographyFamily(MotionModel.Homography),
    ];

    private protected MotionFamily(MotionModel model, string name, int parameterCount, int minimalSampleSize)
    {
        Model = model;
        Name = name;
        ParameterCount = parameterCount;
        MinimalSampleSize = minimalSampleSize;
    }

    /// <summary>Every family, least free first (each is a special case of the ones after it).</summary>
    public static IReadOnlyList<MotionFamily> All => ByModel;

    public static MotionFamily Translation => ByModel[0];

    public static MotionFamily Similarity => ByModel[1];

    public static MotionFamily Affine => ByModel[2];

    public static MotionFamily Homography => ByModel[3];

    /// <summary>The family of a model.</summary>
    public static MotionFamily Of(MotionModel model)
    {
        foreach (var family in ByModel)
        {
            if (family.Model == model)
            {
                return family;
            }
        }
        throw new ArgumentOutOfRangeException(nameof(model), model, "Unknown motion model.");
    }

    /// <summary>The family with this name (<see cref="Name"/>, exact spelling); false when none has it.</summary>
    public static bool TryParse(string? name, [System.Diagnostics.CodeAnalysis.NotNullWhen(true)] out MotionFamily? family)
    {
        family = ByModel.FirstOrDefault(f => f.Name == name);
        return family is not null;
    }

    /// <summary>The names, most free first, as a list in words ("homography, affine, similarity or translation").</summary>
    public static string NamesInWords()
    {
        var names = ByModel.Reverse().Select(f => f.Name).ToArray();
        return string.Join(", ", names[..^1]) + " or " + names[^1];
    }

    public MotionModel Model { get; }

    /// <summary>The word for the model in settings, on the command line and in output files.</summary>
    public string Name { get; }

    /// <summary>Degrees of freedom: the length of the parameter vector.</summary>
    public int ParameterCount { get; }

    /// <summary>Matches in a minimal sample.</summary>
    public int MinimalSampleSize { get; }

    /// <summary>
    /// True when every transform of this family is also one of <paramref name="other"/>'s (this is
    /// at most as free). The families form a chain, so this is the order of the parameter counts.
    /// </summary>
    public bool IsSpecialCaseOf(MotionFamily other)
    {
        ArgumentNullException.ThrowIfNull(other);
        return ParameterCount <= other.ParameterCount;
    }

    /// <summary>True when w depends on the parameters (only the homography is not affine).</summary>
    internal virtual bool HasDepth => false;

    /// <summary>Models through a minimal sample, written into <paramref name="models"/>; returns how many.</summary>
    public abstract int SolveMinimal(ReadOnlySpan<Correspondence> sample, Span<Transform2D> models);

    /// <summary>The family's own least-squares solver over more than a minimal sample.</summary>
    public abstract bool TrySolveLeastSquares(ReadOnlySpan<Correspondence> data, out Transform2D model);

    /// <summary>
    /// Least-squares fit of the forward transfer error to tie points (the set alignment's refit):
    /// the closed-form solvers minimise it already; null when no finite fit exists.
    /// </summary>
    public virtual Transform2D? FitTransferError(ReadOnlySpan<Correspondence> ties) =>
        TrySolveLeastSquares(ties, out var t) && t.IsFinite ? t : null;

    /// <summary>
    /// The first problem that makes a transform implausible over the region with these corners,
    /// or null (see <see cref="TransformSanity"/>; every family checks the same rules today).
    /// </summary>
    public virtual string? FindSanityProblem(in Transform2D h, ReadOnlySpan<(double X, double Y)> corners, SanityLimits limits, string regionName) =>
        TransformSanity.FindProblem(h, corners, limits, regionName);

    /// <summary>
    /// Seeded sampling with this family's estimator (a struct, so the generic sampling loop is
    /// specialised and inlined per family); see <see cref="PairEstimator.Sample"/>.
    /// </summary>
    internal abstract SamplingOutcome Sample(ReadOnlySpan<Correspondence> data, EstimationOptions options, SamplingSettings settings, ulong seed, SamplerKind kind);

    /// <summary>Parameters of a transform whose m33 is 1 (entries outside the family are dropped).</summary>
    internal abstract void ToParameters(in Transform2D h, Span<double> p);

    internal abstract Transform2D FromParameters(ReadOnlySpan<double> p);

    /// <summary>
    /// Derivatives of the mapped point (u, v) with respect to the parameters, given 1/w and the
    /// point divided by w: row u into du, row v into dv.
    /// </summary>
    internal abstract void FillDerivatives(double iw, double xw, double yw, double u, double v, Span<double> du, Span<double> dv);

    /// <summary>
    /// Mapped point (u, v) of (x, y) and its derivatives with respect to the parameters.
    /// Returns false when the point maps behind the viewer (w &lt;= 0).
    /// </summary>
    internal bool MapWithJacobian(in Transform2D h, double x, double y, out double u, out double v, Span<double> du, Span<double> dv)
    {
        double w = h.M31 * x + h.M32 * y + h.M33;
        if (!(w > 0))
        {
            u = v = double.NaN;
            return false;
        }
        double iw = 1 / w;
        u = (h.M11 * x + h.M12 * y + h.M13) * iw;
        v = (h.M21 * x + h.M22 * y + h.M23) * iw;
        FillDerivatives(iw, x * iw, y * iw, u, v, du, dv);
        return double.IsFinite(u) && double.IsFinite(v);
    }

    /// <summary>
    /// The consensus refinement's linear rows of one normalised datum (x, y): u, v and w of the
    /// model as coefficient vectors over the parameters plus constants u0, v0 (w's constant is 1).
    /// The spans arrive cleared and u0 = v0 = 0. <paramref name="translationScale"/> is the ratio
    /// of the two normalisation scales (a pixel translation keeps that diagonal when normalised).
    /// </summary>
    internal abstract void LinearRows(double x, double y, double translationScale, Span<double> uc, Span<double> vc, Span<double> wc, ref double u0, ref double v0);

    /// <summary>The normalised transform of the linear program's parameter vector (see <see cref="LinearRows"/>).</summary>
    internal virtual Transform2D FromLinearParameters(ReadOnlySpan<double> theta, double translationScale) => FromParameters(theta);

    /// <summary>A pixel transform brought back into the family after denormalisation (positive factor, |h33| = 1 or exact form).</summary>
    internal virtual Transform2D ProjectPixel(in Transform2D h) => h with { M31 = 0, M32 = 0, M33 = 1 };

    public override string ToString() => Name;
}
