using System.Data.Common;
using Microsoft.Data.Sqlite;
using Microsoft.EntityFrameworkCore;
using Microsoft.EntityFrameworkCore.Infrastructure;
using Microsoft.EntityFrameworkCore.Metadata;
using Microsoft.EntityFrameworkCore.Storage;
using Microsoft.EntityFrameworkCore.Storage.ValueConversion;

namespace Triage.Cases.Intake;

/// <summary>
/// Writes entities built by their own rules (Claim.Receive, Case.Open, ...) as new rows with one prepared
/// INSERT, inside the context's current transaction and without change tracking. Table, columns and values
/// come from the EF model itself (column names, value converters, provider type mappings), so a row is
/// what SaveChanges would write, and a column added to the entity is written without touching this code.
/// Foreign keys to rows written just before are passed per row: the entities know their parents only by
/// navigation, and the parents' keys exist only once written.
/// </summary>
internal sealed class RowInserter<T> : IDisposable where T : class
{
    private readonly DbCommand _command;
    private readonly (IPropertyBase Property, IClrPropertyGetter Get, ValueConverter? Convert, DbParameter Parameter)[] _columns;
    private readonly (DbParameter Parameter, Type Type)[] _given;
    private readonly bool _returnsKey;
    private readonly SqliteConnection? _sqlite;

    /// <param name="returnsKey">Whether <see cref="InsertAsync"/> must give the new row's generated key (children refer to it).</param>
    /// <param name="given">Properties whose values the caller passes with each row (foreign keys), in that order.</param>
    public RowInserter(DbContext db, bool returnsKey, params string[] given)
    {
        var entity = db.Model.FindEntityType(typeof(T)) ?? throw new InvalidOperationException($"{typeof(T).Name} is not in the model.");
        var table = StoreObjectIdentifier.Table(entity.GetTableName()!, entity.GetSchema());
        var sql = db.GetService<ISqlGenerationHelper>();
        var connection = db.Database.GetDbConnection();
        _command = connection.CreateCommand();
        _command.Transaction = db.Database.CurrentTransaction?.GetDbTransaction()
            ?? throw new InvalidOperationException("Rows are written only inside the import's transaction.");

        var key = entity.FindPrimaryKey()!.Properties.Single();
        var generated = key.ValueGenerated == ValueGenerated.OnAdd;
        if (returnsKey && !generated) throw new InvalidOperationException($"{typeof(T).Name} has no generated key to return.");
        _returnsKey = returnsKey;
        // SQLite's RETURNING costs about three times the insert itself (measured, 150,000 rows); its last row id is free.
        _sqlite = connection as SqliteConnection;
        var names = new List<string>();
        var columns = new List<(IPropertyBase, IClrPropertyGetter, ValueConverter?, DbParameter)>();
        var givenParameters = new (DbParameter, Type)[given.Length];
        foreach (var p in entity.GetProperties())
        {
            if (generated && p == key) continue;
            var mapping = (RelationalTypeMapping)p.GetTypeMapping();
            // Named with its prefix: Microsoft.Data.Sqlite otherwise looks each name up under every prefix on every row.
            var name = $"@p{names.Count}";
            var parameter = mapping.CreateParameter(_command, name, null, p.IsNullable);
            _command.Parameters.Add(parameter);
            names.Add(p.GetColumnName(table)!);
            var at = Array.IndexOf(given, p.Name);
            if (at >= 0) givenParameters[at] = (parameter, Nullable.GetUnderlyingType(p.ClrType) ?? p.ClrType);
            else if (p.IsShadowProperty()) throw new InvalidOperationException($"{typeof(T).Name}.{p.Name} is a shadow property; pass its value per row.");
            else columns.Add((p, p.GetGetter(), mapping.Converter, parameter));
        }
        if (givenParameters.Any(g => g.Item1 is null))
            throw new InvalidOperationException($"{typeof(T).Name} has no column for one of {string.Join(", ", given)}.");
        _columns = [.. columns];
        _given = givenParameters;
        _command.CommandText =
            $"INSERT INTO {sql.DelimitIdentifier(table.Name, table.Schema)} ({string.Join(", ", names.Select(n => sql.DelimitIdentifier(n)))}) " +
            $"VALUES ({string.Join(", ", names.Select((_, i) => "@p" + i))})" +
            (_returnsKey && _sqlite is null ? $" RETURNING {sql.DelimitIdentifier(key.GetColumnName(table)!)}" : "");
        _command.Prepare();
    }

    /// <summary>Writes one row; <paramref name="given"/> holds the values of the given properties (null for none). Returns the generated key, or 0 when not asked for.</summary>
    public async Task<long> InsertAsync(T row, CancellationToken ct, params long?[] given)
    {
        foreach (var (_, get, convert, parameter) in _columns)
        {
            var value = get.GetClrValueUsingContainingEntity(row);
            parameter.Value = (convert is null || value is null ? value : convert.ConvertToProvider(value)) ?? DBNull.Value;
        }
        for (var i = 0; i < _given.Length; i++)
            _given[i].Parameter.Value = given[i] is { } v ? Convert.ChangeType(v, _given[i].Type) : DBNull.Value;
        if (_returnsKey && _sqlite is null) return Convert.ToInt64(await _command.ExecuteScalarAsync(ct));
        await _command.ExecuteNonQueryAsync(ct);
        return _returnsKey ? SQLitePCL.raw.sqlite3_last_insert_rowid(_sqlite!.Handle) : 0;
    }

    public void Dispose() => _command.Dispose();
}
