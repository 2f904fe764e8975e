namespace Seamwright.Pipeline.State;

/// <summary>Tells whether a path lives on a network file system (the ledger must be on local disk).</summary>
public static class StoragePlace
{
    private static readonly HashSet<string> NetworkTypes = new(StringComparer.Ordinal)
    {
        "cifs", "smb3", "smbfs", "nfs", "nfs4", "fuse.sshfs", "sshfs", "9p", "afs", "ncpfs", "fuse.rclone", "davfs",
    };

    public static bool IsNetworkPath(string path)
    {
        string full = Path.GetFullPath(path);
        if (OperatingSystem.IsWindows())
        {
            if (full.StartsWith(@"\\", StringComparison.Ordinal))
            {
                return true;
            }
            try
            {
                return new DriveInfo(Path.GetPathRoot(full)!).DriveType == DriveType.Network;
            }
            catch (ArgumentException)
            {
                return false;
            }
        }
        try
        {
            string best = "";
            string type = "";
            foreach (var line in File.ReadLines("/proc/mounts"))
            {
                var parts = line.Split(' ');
                if (parts.Length < 3)
                {
                    continue;
                }
                string mount = parts[1].Replace("\\040", " ", StringComparison.Ordinal);
                bool under = full == mount || full.StartsWith(mount.TrimEnd('/') + "/", StringComparison.Ordinal);
                if (under && mount.Length > best.Length)
                {
                    best = mount;
                    type = parts[2];
                }
            }
            return NetworkTypes.Contains(type);
        }
        catch (IOException)
        {
            return false;
        }
        catch (UnauthorizedAccessException)
        {
            return false;
        }
    }
}
