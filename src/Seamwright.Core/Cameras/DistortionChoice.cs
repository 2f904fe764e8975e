using System.Globalization;

namespace Seamwright.Core.Cameras;

/// <summary>
/// <see cref="DistortionTerms.Auto"/>: the set solved without distortion and with k1 per camera,
/// k1 kept when it places at least as many images and either keeps more links (the plain model
/// had to leave out links the lens explains) or keeps as many and lowers the tie points' sum of
/// squares by more than Schwarz's criterion charges for the extra terms (Schwarz, Annals of
/// Statistics 1978: n ln(S0 / S1) &gt; p ln n, n residual coordinates, p terms) and by at least
/// <see cref="MinImprovement"/>. A lens without distortion only fits noise with k1, which stays
/// well inside that charge, so such sets keep the plain solution unchanged.
/// </summary>
public static class DistortionChoice
{
    /// <summary>Smallest relative drop of the sum of squares that keeps k1 (judgement: a real lens moves its corners by pixels).</summary>
    public const double MinImprovement = 0.10;

    public static RotationSetSolution Prefer(RotationSetSolution plain, RotationSetSolution withK1, int cameras)
    {
        ArgumentNullException.ThrowIfNull(plain);
        ArgumentNullException.ThrowIfNull(withK1);
        double k1 = withK1.Poses.OfType<CameraPose>().Select(p => p.Distortion.K1).FirstOrDefault();
        string figures = string.Create(CultureInfo.InvariantCulture,
            $"tie-point RMS {withK1.Residuals.RmsPx:0.###} px with k1 = {k1:0.####} over {withK1.Residuals.Links} links, {plain.Residuals.RmsPx:0.###} px without over {plain.Residuals.Links}");
        if (withK1.PlacedCount < plain.PlacedCount || withK1.Residuals.Links < plain.Residuals.Links)
        {
            return plain with { DistortionReason = "no lens distortion (k1 places fewer images or keeps fewer links: " + figures + ")" };
        }
        if (withK1.Residuals.Links > plain.Residuals.Links || withK1.PlacedCount > plain.PlacedCount)
        {
            return withK1 with { DistortionReason = "radial distortion k1 estimated (it keeps links the plain model leaves out: " + figures + ")" };
        }
        double s0 = plain.Residuals.RmsPx * plain.Residuals.RmsPx * plain.Residuals.TiePoints;
        double s1 = withK1.Residuals.RmsPx * withK1.Residuals.RmsPx * withK1.Residuals.TiePoints;
        int n = 2 * plain.Residuals.TiePoints;
        bool better = s1 > 0 && s1 <= (1 - MinImprovement) * s0 && n * Math.Log(s0 / s1) > cameras * Math.Log(Math.Max(n, 2));
        return better
            ? withK1 with { DistortionReason = "radial distortion k1 estimated (" + figures + ")" }
            : plain with { DistortionReason = "no lens distortion (k1 does not explain the tie points better: " + figures + ")" };
    }
}
