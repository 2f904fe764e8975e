using System.Text.RegularExpressions;

namespace Seamwright.Pipeline.State;

/// <summary>The values of <c>Seamwright:State:Provider</c>.</summary>
public static class StateProviders
{
    public const string Sqlite = "Sqlite";
    public const string PostgreSql = "PostgreSql";

    public static bool IsKnown(string? name) =>
        string.Equals(name, Sqlite, StringComparison.OrdinalIgnoreCase) || string.Equals(name, PostgreSql, StringComparison.OrdinalIgnoreCase);

    public static bool IsPostgreSql(string? name) => string.Equals(name, PostgreSql, StringComparison.OrdinalIgnoreCase);
}

/// <summary>
/// The identity of an output root, shared by every node that writes it: a random id kept in
/// <c>.seamwright/root-id</c> (created once, exclusively). The PostgreSQL schema of the root's
/// ledger is named from it, so nodes that mount the root at different paths still agree.
/// </summary>
public static partial class RootIdentity
{
    public const string FileName = "root-id";

    public static string PathOf(string outputRoot) => Path.Combine(outputRoot, StateStore.StateFolder, FileName);

    /// <summary>Reads the root's id, creating it when <paramref name="create"/> (returns null when absent and not creating).</summary>
    public static string? Get(string outputRoot, bool create)
    {
        string path = PathOf(outputRoot);
        for (int attempt = 0; attempt < 50; attempt++)
        {
            if (File.Exists(path))
            {
                string text = File.ReadAllText(path).Trim();
                if (IdPattern().IsMatch(text))
                {
                    return text;
                }
                if (text.Length > 0 || attempt > 20)
                {
                    throw new InvalidDataException($"The output root identity file {path} is damaged (expected 32 hex digits); restore it from a node's copy or delete it only if no node has used this root.");
                }
                Thread.Sleep(50); // another node is writing it this moment
                continue;
            }
            if (!create)
            {
                return null;
            }
            Directory.CreateDirectory(Path.GetDirectoryName(path)!);
            try
            {
                using var fs = new FileStream(path, FileMode.CreateNew, FileAccess.Write, FileShare.Read);
                byte[] id = System.Text.Encoding.ASCII.GetBytes(Guid.NewGuid().ToString("N") + "\n");
                fs.Write(id);
                fs.Flush(flushToDisk: true);
            }
            catch (IOException) when (File.Exists(path))
            {
                // Another node created it first: read theirs.
            }
        }
        throw new IOException("Could not read the output root identity file " + path);
    }

    /// <summary>The PostgreSQL schema of the root with this id.</summary>
    public static string SchemaFor(string id) => "sw_" + id[..16];

    [GeneratedRegex("^[0-9a-f]{32}$")]
    private static partial Regex IdPattern();
}
