namespace Seamwright.Host.Supervision;

/// <summary>
/// How to start a worker: the same `seamwright` program with the hidden `worker` command.
/// From the apphost that is the current executable; under `dotnet seamwright.dll` (and in tests)
/// it is `dotnet` with the assembly path.
/// </summary>
internal sealed record WorkerLaunch(string FileName, IReadOnlyList<string> Arguments)
{
    public static WorkerLaunch ForCurrentProgram()
    {
        string assembly = typeof(WorkerLaunch).Assembly.Location;
        string? process = Environment.ProcessPath;
        if (process is not null && Path.GetFileNameWithoutExtension(process).Equals("seamwright", StringComparison.OrdinalIgnoreCase))
        {
            return new WorkerLaunch(process, ["worker"]);
        }
        return ForAssembly(assembly);
    }

    /// <summary>`dotnet seamwright.dll worker`, using the dotnet host that runs this process when it is one.</summary>
    public static WorkerLaunch ForAssembly(string seamwrightDll)
    {
        string? process = Environment.ProcessPath;
        string dotnet = process is not null && Path.GetFileNameWithoutExtension(process).Equals("dotnet", StringComparison.OrdinalIgnoreCase)
            ? process
            : "dotnet";
        return new WorkerLaunch(dotnet, [seamwrightDll, "worker"]);
    }
}
