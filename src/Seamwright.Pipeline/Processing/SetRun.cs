using Seamwright.Pipeline.Sets;
using Seamwright.Pipeline.Settings;

namespace Seamwright.Pipeline.Processing;

/// <summary>
/// One run of one set as every stage sees it: the set's inputs, the ledger's run id, and the
/// <see cref="RunPlan"/> resolved once when the run began (stages never read live settings).
/// </summary>
public sealed record SetRun(SetInputs Set, long RunId, RunPlan Plan, bool Incomplete)
{
    public string SetId => Set.SetId;

    public ProfileSettings Profile => Plan.Profile;

    public string Fingerprint => Plan.Fingerprint;
}

/// <summary>A file of a set that changed or vanished during its run: the run describes nothing real and is abandoned.</summary>
public sealed class InputsChangedException : Exception
{
    public InputsChangedException() : base("an input changed during the run") { }

    public InputsChangedException(string message) : base(message) { }

    public InputsChangedException(string message, Exception inner) : base(message, inner) { }
}

/// <summary>This node lost its claim on the set (shared ledger) before publishing: it publishes nothing and another node redoes the set.</summary>
public sealed class LeaseLostException : Exception
{
    public LeaseLostException() : base("the claim on the set was lost") { }

    public LeaseLostException(string message) : base(message) { }

    public LeaseLostException(string message, Exception inner) : base(message, inner) { }
}
