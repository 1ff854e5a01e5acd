// The README documents the history database's tables column by column for people who query the file
// directly; this checks that list against the tables a new history really holds (SQLite's own
// PRAGMA table_info on a file openHistory created), in both directions, and the version it documents.

import { mkdtempSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { openHistory, SCHEMA_VERSION } from '../../src/history/index.js';

const ROOT = join(import.meta.dirname, '../..');
const dir = mkdtempSync(join(tmpdir(), 'stopspan-history-tables-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

/** `table.column` for each row of the README's table of history columns. */
function documentedColumns(): string[] {
  const readme = readFileSync(join(ROOT, 'README.md'), 'utf8');
  const rows = [...readme.matchAll(/^\| `([a-z_]+)` \| `([a-z_]+)` \| .+ \|$/gm)];
  return rows.map((m) => `${m[1]}.${m[2]}`);
}

describe('history tables in the README', () => {
  it('lists exactly the columns of every table a new history holds', () => {
    const db = openHistory(join(dir, 'h.sqlite'));
    try {
      const tables = (
        db.prepare("SELECT name FROM sqlite_master WHERE type = 'table' AND name NOT LIKE 'sqlite_%' ORDER BY name").all() as {
          name: string;
        }[]
      ).map((t) => t.name);
      expect(tables).toEqual(['run_findings', 'runs', 'schema_version']);
      const actual = tables.flatMap((t) =>
        (db.prepare(`PRAGMA table_info(${t})`).all() as { name: string }[]).map((c) => `${t}.${c.name}`),
      );
      expect(documentedColumns().sort()).toEqual(actual.sort());
    } finally {
      db.close();
    }
  });

  it('documents the layout version the code writes', () => {
    const readme = readFileSync(join(ROOT, 'README.md'), 'utf8');
    expect(readme).toContain(`| \`schema_version\` | \`version\` | the layout's version (${SCHEMA_VERSION}) |`);
  });
});
