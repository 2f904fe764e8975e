namespace Seamwright.Pipeline.Output;

/// <summary>
/// A file written and flushed under its temporary name (<see cref="AtomicFile.Stage"/>) and not yet
/// renamed over its target: <see cref="Commit"/> publishes it, disposing it uncommitted deletes it.
/// Lets a writer prepare every file of a publication, decide whether it may still publish, and only
/// then change what readers see.
/// </summary>
public sealed class StagedFile : IDisposable
{
    private bool _committed;

    internal StagedFile(string target, string temporary)
    {
        Target = target;
        Temporary = temporary;
    }

    /// <summary>The full path the file replaces when committed.</summary>
    public string Target { get; }

    /// <summary>The full path of the flushed temporary file.</summary>
    public string Temporary { get; }

    /// <summary>Renames the temporary file over the target (the folder is not flushed: <see cref="AtomicFile.SyncDirectory"/>).</summary>
    public void Commit()
    {
        if (_committed)
        {
            throw new InvalidOperationException("The staged file was committed or discarded already: " + Target);
        }
        File.Move(Temporary, Target, overwrite: true);
        _committed = true;
    }

    public void Dispose()
    {
        if (!_committed)
        {
            _committed = true;
            AtomicFile.TryDelete(Temporary);
        }
    }
}
