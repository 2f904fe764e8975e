namespace Seamwright.Core.Geometry;

/// <summary>
/// The part of the first image where a pair's transform is judged: the bounding box of the
/// inliers' first points. A correct homography between two views of a rotating camera sends the
/// far corner of one image towards infinity in the other (its w falls towards zero there), so
/// plausibility and corner uncertainty measured over the whole rectangle reject good pairs; over
/// the region the two images share they measure what a stitch uses.
/// </summary>
public static class OverlapRegion
{
    /// <summary>Fewest inliers for their box to stand for the overlap; with fewer the whole rectangle is used.</summary>
    public const int MinimumInliers = 4;

    /// <summary>
    /// Corners of the bounding box of the first points of <paramref name="inliers"/> (indices into
    /// <paramref name="matches"/>), clipped to the first image's rectangle; the whole rectangle's
    /// corners when there are fewer than <see cref="MinimumInliers"/> inliers.
    /// </summary>
    public static (double X, double Y)[] Corners(ReadOnlySpan<Correspondence> matches, ReadOnlySpan<int> inliers, ImageSize sizeA)
    {
        double width = Math.Max(sizeA.Width, 1), height = Math.Max(sizeA.Height, 1);
        if (inliers.Length < MinimumInliers)
        {
            return Transform2D.Corners(width, height);
        }
        double minX = double.PositiveInfinity, minY = double.PositiveInfinity;
        double maxX = double.NegativeInfinity, maxY = double.NegativeInfinity;
        foreach (int i in inliers)
        {
            var m = matches[i];
            minX = Math.Min(minX, m.X1);
            minY = Math.Min(minY, m.Y1);
            maxX = Math.Max(maxX, m.X1);
            maxY = Math.Max(maxY, m.Y1);
        }
        minX = Math.Clamp(minX, 0, width - 1);
        maxX = Math.Clamp(maxX, 0, width - 1);
        minY = Math.Clamp(minY, 0, height - 1);
        maxY = Math.Clamp(maxY, 0, height - 1);
        return [(minX, minY), (maxX, minY), (maxX, maxY), (minX, maxY)];
    }
}
