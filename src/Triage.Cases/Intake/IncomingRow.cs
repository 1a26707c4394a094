namespace Triage.Cases.Intake;

/// <summary>
/// One row as read from the input: its cells by column name, and what the reader already found wrong.
/// A fatal row (bad header, broken encoding or quoting) ends the reading: nothing after it can be trusted.
/// </summary>
internal sealed record IncomingRow(int Row, Dictionary<string, string?> Cells, List<RowError> Errors, bool Fatal = false)
{
    public static IncomingRow Stop(RowError error) => new(error.Row, [], [error], Fatal: true);

    public static IncomingRow Broken(int row, string problem) => new(row, [], [new RowError(row, null, null, problem)]);
}
