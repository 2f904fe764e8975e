namespace Seamwright.Pipeline.Settings;

/// <summary>One configured rig baseline (`Frames` pairing): camera A to camera B as a 3x3 row-major transform (9 numbers).</summary>
public sealed class RigBaselineSetting
{
    /// <summary>Camera A: the folder of its images within the watched root.</summary>
    public string CameraA { get; set; } = "";
    public string CameraB { get; set; } = "";
    public double[] Transform { get; set; } = [];
}
