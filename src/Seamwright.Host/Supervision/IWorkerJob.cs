namespace Seamwright.Host.Supervision;

/// <summary>
/// What a worker does with one request, inside the worker process. Throwing is allowed: the
/// worker turns any exception into a failed reply with the exception as reason.
/// </summary>
internal interface IWorkerJob
{
    WorkerReply Run(WorkerRequest request);
}
