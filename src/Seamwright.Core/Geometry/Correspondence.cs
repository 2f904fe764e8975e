namespace Seamwright.Core.Geometry;

/// <summary>A tentative match: a point (X1, Y1) in the first image and (X2, Y2) in the second, in pixels.</summary>
public readonly record struct Correspondence(double X1, double Y1, double X2, double Y2);
