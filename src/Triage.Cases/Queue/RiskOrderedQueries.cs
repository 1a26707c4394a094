using System.Linq.Expressions;
using Microsoft.EntityFrameworkCore;
using Triage.Cases.Domain;
using Triage.Cases.Store;

namespace Triage.Cases.Queue;

/// <summary>
/// Precompiled forms of the queue's default read (riskiest first), one per filter shape. EF Core's query
/// cache lookup costs more than the indexed SQL itself here, so the hot path skips it.
/// </summary>
internal static class RiskOrderedQueries
{
    public delegate IAsyncEnumerable<QueueRow> Page(TriageDbContext db, string? userId, string? line, int skip, int take);

    private static readonly Dictionary<(QueueView View, bool ByLine), Page> Compiled = new()
    {
        [(QueueView.Mine, false)] = Compile((c, u, l) => c.AssigneeId == u && c.IsOpen),
        [(QueueView.Mine, true)] = Compile((c, u, l) => c.AssigneeId == u && c.IsOpen && c.Line == l),
        [(QueueView.Unassigned, false)] = Compile((c, u, l) => c.AssigneeId == null && c.IsOpen),
        [(QueueView.Unassigned, true)] = Compile((c, u, l) => c.AssigneeId == null && c.IsOpen && c.Line == l),
        [(QueueView.AllOpen, false)] = Compile((c, u, l) => c.IsOpen),
        [(QueueView.AllOpen, true)] = Compile((c, u, l) => c.IsOpen && c.Line == l),
    };

    public static Page For(QueueQuery q) => Compiled[(q.View, q.Line is not null)];

    private static Page Compile(Expression<Func<Case, string?, string?, bool>> where)
    {
        Expression<Func<TriageDbContext, string?, string?, int, int, IQueryable<QueueRow>>> template = (db, u, l, skip, take) =>
            db.Cases.AsNoTracking().Where(c => Filter(c, u, l))
                .OrderByDescending(c => c.Probability).ThenByDescending(c => c.Id)
                .Skip(skip).Take(take)
                .Select(c => new QueueRow(c.Id, c.ClaimNumber, c.Line, c.ClaimedAmount, c.Probability, c.RiskScore,
                    c.TopDriver1, c.TopDriver2, c.ReceivedDate, c.DueDate, c.Status, c.AssigneeName));
        var query = (Expression<Func<TriageDbContext, string?, string?, int, int, IQueryable<QueueRow>>>)new InlineFilter(where).Visit(template);
        var compiled = EF.CompileAsyncQuery(query);
        return (db, u, l, skip, take) => compiled(db, u, l, skip, take);
    }

    // Only a marker inside the template; InlineFilter replaces every call with the filter's body.
    private static bool Filter(Case c, string? userId, string? line) =>
        throw new InvalidOperationException("Filter is replaced before the query is compiled.");

    private sealed class InlineFilter(Expression<Func<Case, string?, string?, bool>> where) : ExpressionVisitor
    {
        protected override Expression VisitMethodCall(MethodCallExpression node)
        {
            if (node.Method.Name != nameof(Filter) || node.Method.DeclaringType != typeof(RiskOrderedQueries))
                return base.VisitMethodCall(node);
            var map = where.Parameters.Zip(node.Arguments).ToDictionary(p => p.First, p => Visit(p.Second));
            return new Substitute(map).Visit(where.Body);
        }
    }

    private sealed class Substitute(Dictionary<ParameterExpression, Expression> map) : ExpressionVisitor
    {
        protected override Expression VisitParameter(ParameterExpression node) => map.GetValueOrDefault(node, node);
    }
}
