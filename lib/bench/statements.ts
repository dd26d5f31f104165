// The stroke save's statements, planned once. PGlite's query() sends every statement unnamed, so
// PostgreSQL plans it again each time, and for the save's few statements planning costs more than
// running them (EXPLAIN ANALYZE on PGlite: about 1.2 ms to plan the seat lock, 0.3 ms to run it).
// On PGlite each statement is therefore PREPAREd once per database and then EXECUTEd; a prepared
// statement is PostgreSQL's own plan cache (the PREPARE statement, PostgreSQL manual, "SQL
// Commands"). The EXECUTEs go to PGlite's exec(), several in one message. On a PostgreSQL server
// the same text runs as an ordinary statement.
//
// EXECUTE takes its values in the statement's text. Each one is written as a quoted literal of
// the text PGlite would have bound for it (arrays in PostgreSQL's array syntax), and every
// parameter of these statements carries an explicit cast, so the value has the same type either
// way; the quoting doubles single quotes, which is all a literal needs with
// standard_conforming_strings on (PostgreSQL's default since 9.1).
import { fillPlaceholders, is, Param, sql, type SQL } from "drizzle-orm";
import { PgDialect } from "drizzle-orm/pg-core";
import { PgliteDatabase } from "drizzle-orm/pglite";
import type { Db } from "@/db/client";

const dialect = new PgDialect();

function quote(text: string): string {
  if (text.includes("\u0000")) throw new Error("A value for a prepared statement holds a NUL character.");
  return `'${text.replaceAll("'", "''")}'`;
}

function arrayElement(value: unknown): string {
  if (value === null || value === undefined) return "NULL";
  if (Array.isArray(value)) return arrayText(value);
  return `"${scalarText(value).replaceAll("\\", "\\\\").replaceAll('"', '\\"')}"`;
}

function arrayText(values: unknown[]): string {
  return `{${values.map(arrayElement).join(",")}}`;
}

function scalarText(value: unknown): string {
  switch (typeof value) {
    case "string":
      return value;
    case "number":
      if (!Number.isFinite(value)) throw new Error(`A value for a prepared statement is not a finite number: ${value}.`);
      return String(value);
    case "bigint":
      return String(value);
    case "boolean":
      return value ? "true" : "false";
    default:
      if (value instanceof Date) return value.toISOString();
      throw new Error(`A value for a prepared statement has a type it cannot be written in: ${typeof value}.`);
  }
}

/** A value as an SQL literal: NULL, or the text PGlite would bind for it, quoted. */
export function literal(value: unknown): string {
  if (value === null || value === undefined) return "NULL";
  return quote(Array.isArray(value) ? arrayText(value) : scalarText(value));
}

type Rows<T> = { rows: T[] };

/** PGlite's own client under a drizzle transaction (drizzle's PGlite session keeps it as `client`). */
type SimpleClient = { exec(text: string): Promise<Array<Rows<unknown>>> };

function pgliteClientOf(tx: Db): SimpleClient {
  const client = (tx as unknown as { session?: { client?: Partial<SimpleClient> } }).session?.client;
  if (!client || typeof client.exec !== "function") throw new Error("Prepared statements need PGlite's own client under the transaction.");
  return client as SimpleClient;
}

/**
 * How these statements are planned on PGlite, set at the start of each transaction that runs
 * them, as SET LOCAL would (set_config with is_local; one statement for the four, because on
 * PGlite every statement has a cost of its own).
 *
 * plan_cache_mode: a prepared statement is planned anew for its first five runs and whenever
 * PostgreSQL guesses a fresh plan would be cheaper, which for these statements it always does;
 * the point is to plan once (PostgreSQL 12 and later).
 *
 * enable_seqscan, enable_hashjoin, enable_mergejoin: PGlite runs no autovacuum, so its tables are
 * never analysed, and the one plan is made at the first save, often on a nearly empty database.
 * The planner then scans whole tables and hashes them (the cheapest way through a few pages),
 * and that plan stays for the life of the process while the tables grow: with 750 seats open,
 * the curve read took 2.7 ms instead of 0.3 ms, and it grows with every stroke stored. Every
 * statement here looks up a few rows by key, for which index lookups in nested loops are right
 * at any size, so the planner is told to avoid the others (it still uses them where there is no
 * index; tests/bench/statements.test.ts checks that none is left). These settings
 * steer planning only and change no result.
 */
export const PLANNER_SETTINGS =
  "select set_config('plan_cache_mode', 'force_generic_plan', true), set_config('enable_seqscan', 'off', true), " +
  "set_config('enable_hashjoin', 'off', true), set_config('enable_mergejoin', 'off', true)";

/**
 * A statement whose text never changes, written once as a function of its values. On PGlite it is
 * turned into text once, with placeholders where the values go (drizzle's sql.placeholder), and
 * each run only fills them in; building and rendering the query each time cost the save as much
 * as a statement did. On a server it is built with the values as ordinary parameters.
 *
 * A statement that returns rows answers them as one JSON text (json_agg), read back with
 * JSON.parse, on either database. PGlite copies every field of every row out of its engine on
 * its own (about 1.5 µs a field here: the seat lock's 17 columns for 10 saves took 0.6 ms to
 * read, as one JSON text 0.35 ms). The rows are then JSON's values: uuids, text and timestamps
 * (ISO 8601) as strings, numbers and booleans as themselves, NULL as null.
 */
export class FixedStatement<K extends string> {
  private compiled: { sql: string; params: unknown[] } | null = null;

  constructor(
    readonly key: string,
    private readonly build: (values: Record<K, SQL>) => SQL,
    /** "rows" for a query or a statement with RETURNING; "nothing" for one without. */
    readonly returns: "rows" | "nothing" = "rows",
  ) {}

  private wrapped(values: Record<K, SQL>): SQL {
    const inner = this.build(values);
    return this.returns === "rows" ? sql`with x as (${inner}) select coalesce(json_agg(x), '[]'::json)::text as rows from x` : inner;
  }

  /** The text, with its parameters as placeholders named by the values' keys. */
  text(): { sql: string; params: unknown[] } {
    this.compiled ??= dialect.sqlToQuery(this.wrapped(new Proxy({} as Record<K, SQL>, { get: (_, name) => sql`${sql.placeholder(String(name))}` })));
    return this.compiled;
  }

  /** The query with these values as parameters. */
  query(values: Record<K, unknown>): SQL {
    const params = Object.fromEntries(Object.entries(values).map(([k, v]) => [k, sql`${new Param(v)}`])) as Record<K, SQL>;
    return this.wrapped(params);
  }

  /** The rows of one run, from what the database answered. */
  rowsOf(answered: unknown[]): unknown[] {
    if (this.returns === "nothing") return [];
    const [first] = answered as Array<{ rows?: unknown }>;
    if (!first || typeof first.rows !== "string") throw new Error(`The statement ${this.key} did not answer its rows as JSON text.`);
    return JSON.parse(first.rows) as unknown[];
  }
}

/** A fixed statement and the values of one run. */
export interface FixedRun<K extends string = string> {
  statement: FixedStatement<K>;
  values: Record<K, unknown>;
}

/** One database's prepared statements: on PGlite, named once each; elsewhere, none. */
export class Statements {
  private readonly prepared = new Map<string, string>();
  private readonly prefix: string;
  private readonly fresh = new WeakSet<object>();

  constructor(private readonly prepare: boolean) {
    // Names of their own per database object: two objects on one PGlite (the database thread and
    // the app's thread reaching it) never meet each other's statements.
    this.prefix = `gf_${Math.random().toString(36).slice(2, 10)}_`;
  }

  /**
   * Called first in each transaction that runs these statements: PLANNER_SETTINGS go out with
   * the transaction's first statements.
   */
  begin(tx: Db): void {
    if (this.prepare) this.fresh.add(tx);
  }

  /**
   * Runs statements in order and gives each one's rows. On PGlite they go out together as one
   * message in PostgreSQL's simple query protocol: PGlite's query() spends six exchanges with the
   * engine on every statement (parse, describe, bind, describe, execute, sync), exec() two for
   * all of them. On a server each runs as an ordinary statement.
   */
  async run(tx: Db, list: FixedRun[]): Promise<unknown[][]> {
    if (!this.prepare) {
      const out: unknown[][] = [];
      for (const { statement, values } of list) {
        const rows = ((await tx.execute(statement.query(values))) as unknown as Rows<unknown>).rows;
        out.push(statement.rowsOf(rows));
      }
      return out;
    }
    const client = pgliteClientOf(tx);
    const calls: string[] = [];
    for (const { statement, values } of list) {
      const { sql: text, params: placeholders } = statement.text();
      const params = fillPlaceholders(placeholders, values);
      const key = statement.key;
      const name = this.prefix + key;
      const known = this.prepared.get(name);
      if (known === undefined) {
        // On its own, and remembered only once it is done: a prepared statement belongs to the
        // connection, not the transaction, so a rollback does not undo it, and preparing a
        // name twice is an error.
        await client.exec(`prepare ${name} as ${text}`);
        this.prepared.set(name, text);
      } else if (known !== text) {
        throw new Error(`Two statements are named ${key} with different texts; each must have a name of its own to be prepared.`);
      }
      calls.push(params.length ? `execute ${name}(${params.map(literal).join(", ")})` : `execute ${name}`);
    }
    const setup = this.fresh.has(tx) ? [PLANNER_SETTINGS] : [];
    this.fresh.delete(tx);
    const results = await client.exec([...setup, ...calls].join(";\n"));
    if (results.length !== setup.length + calls.length) throw new Error(`Expected ${setup.length + calls.length} results, got ${results.length}.`);
    return results.slice(setup.length).map((r, k) => list[k]!.statement.rowsOf(r.rows));
  }
}

const byDb = new WeakMap<object, Statements>();

/** The statements of a database: prepared on PGlite (on either thread), plain on a server. */
export function statementsFor(db: Db): Statements {
  let s = byDb.get(db);
  if (!s) {
    s = new Statements(is(db, PgliteDatabase));
    byDb.set(db, s);
  }
  return s;
}
