using Seamwright.Core.Estimation;
using Seamwright.Core.Geometry;

namespace Seamwright.Core.Alignment;

/// <summary>
/// One pairwise result handed to the set alignment.
/// </summary>
/// <param name="ImageA">Index of the first image in the set.</param>
/// <param name="ImageB">Index of the second image in the set.</param>
/// <param name="AToB">Transform mapping full-resolution pixels of A to pixels of B.</param>
/// <param name="TiePoints">Inlier matches at full resolution: (X1, Y1) in A, (X2, Y2) in B.</param>
/// <param name="Status">The pairwise decision; only accepted (and, by setting, weak) links are used.</param>
/// <param name="Weight">Confidence of the link (larger is better), used for the spanning tree and ties.</param>
public sealed record AlignmentLink(int ImageA, int ImageB, Transform2D AToB, Correspondence[] TiePoints, PairStatus Status, double Weight);
