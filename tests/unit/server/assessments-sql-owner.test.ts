import { readdirSync, readFileSync } from 'node:fs';
import { join, relative, sep } from 'node:path';
import { fileURLToPath } from 'node:url';
import ts from 'typescript';
import { describe, expect, it } from 'vitest';

// The assessment lifecycle module (src/lib/server/assessments/) is the one place that holds SQL
// on the `assessments` table: its status changes, its writes and its reads. Every other server
// module calls a named function of it. This scan reads every string the server's modules hold
// (parsed with the TypeScript compiler, so comments do not count and every quote style and
// template literal does) and fails on any that names the table as SQL would.

const SERVER = fileURLToPath(new URL('../../../src/lib/server', import.meta.url));
/** Folders of src/lib/server whose files may name the table: the owner, and schema or test support if any lands here. */
const ALLOWED = ['assessments', 'migrations', 'test-support'].map((folder) => join(SERVER, folder));

/** A string that is the table, knex style: `'assessments'`, `'assessments as a'`, `'public.assessments a'`. */
const TABLE_NAME = /^\s*(?:"?public"?\s*\.\s*)?"?assessments"?(?:\s+(?:as\s+)?[a-z_][\w]*)?\s*$/i;
/** SQL inside a longer string: `from assessments`, `join "assessments"`, `update public.assessments`… */
const SQL_TABLE =
  /\b(?:from|join|update|into|table|truncate|using)\s+(?:only\s+)?(?:"?public"?\s*\.\s*)?"?assessments"?(?![\w-])/i;
/** The table aliased or quoted as an identifier anywhere in a string: `assessments as later`, `"assessments"`. */
const ALIASED = /(?:^|[\s,(])assessments\s+as\s+[a-z_]|"assessments"/i;

/** The text of every string literal and template in `source` (a template's parts joined around `?`). */
export function stringsOf(source: string, fileName = 'scan.ts'): string[] {
  const file = ts.createSourceFile(fileName, source, ts.ScriptTarget.Latest, true);
  const found: string[] = [];
  const visit = (node: ts.Node) => {
    if (ts.isStringLiteral(node) || ts.isNoSubstitutionTemplateLiteral(node)) found.push(node.text);
    else if (ts.isTemplateExpression(node))
      found.push([node.head.text, ...node.templateSpans.map((s) => s.literal.text)].join(' ? '));
    ts.forEachChild(node, visit);
  };
  visit(file);
  return found;
}

/** The strings of `source` that issue SQL against the `assessments` table. */
export function assessmentsSqlIn(source: string, fileName?: string): string[] {
  return stringsOf(source, fileName).filter(
    (text) => TABLE_NAME.test(text) || SQL_TABLE.test(text) || ALIASED.test(text),
  );
}

function serverModules(dir: string): string[] {
  return readdirSync(dir, { withFileTypes: true }).flatMap((entry) => {
    const path = join(dir, entry.name);
    if (entry.isDirectory()) return ALLOWED.includes(path) ? [] : serverModules(path);
    return /\.(?:[cm]?[jt]s|tsx|jsx)$/.test(entry.name) && !entry.name.endsWith('.d.ts') ? [path] : [];
  });
}

describe('SQL on the assessments table', () => {
  it('is found in every spelling a module could use, and not in paths, imports or comments', () => {
    const spellings = [
      `knex('assessments').where({ id })`,
      `trx("assessments").update({ status: 'signed' })`,
      'knex(`assessments`).count()',
      `knex('assessments as a').join('gates as g', 'g.id', 'a.gate_id')`,
      `knex.from('public.assessments').select('id')`,
      `query.join('assessments as later', 'later.gate_id', 'a.gate_id')`,
      `q.leftJoin('assessments', 'assessments.id', 'd.assessment_id')`,
      `knex.raw('select id from assessments where gate_id = ?', [id])`,
      `knex.raw(\`select a.id
         FROM
           assessments a cross join org where a.organisation_id = \${org}\`)`,
      `knex.raw('select 1 from gates g join assessments a on a.gate_id = g.id')`,
      `knex.raw('select * from "assessments" where id = ?', [id])`,
      `knex.raw('select * from public."assessments"')`,
      `knex.raw("update assessments set status = 'signed'")`,
      `knex.raw('insert into assessments (id) values (?)', [id])`,
      `knex.raw('delete from only assessments where id = ?', [id])`,
      `knex.raw(\`with x as (select * from \${'assessments'} a) select 1\`)`,
      `knex.raw('select 1 from gates g, assessments as a where a.gate_id = g.id')`,
    ];
    for (const code of spellings) expect(assessmentsSqlIn(code), code).not.toEqual([]);

    const notSql = [
      `import type { Assessment } from '@/lib/api/assessments';`,
      `const url = \`/api/assessments/\${id}/photos\`;`,
      `const home = '/assessments';`,
      `// reads from assessments as a whole, joined to their gate\nconst x = 1;`,
      `/* select * from assessments */ const y = 2;`,
      'throw new ConflictError(`This client has ${n} assessment(s) on record, and assessments are kept.`);',
      `knex('assessment_photos').where({ assessment_id: id })`,
      `knex.raw('select 1 from assessments_archive')`,
    ];
    for (const code of notSql) expect(assessmentsSqlIn(code), code).toEqual([]);
  });

  // Parsing every server module takes a few seconds on a busy machine.
  it('lives only in src/lib/server/assessments/', { timeout: 60_000 }, () => {
    const offenders = serverModules(SERVER).flatMap((path) =>
      assessmentsSqlIn(readFileSync(path, 'utf8'), path).map(
        (text) =>
          `${relative(SERVER, path).split(sep).join('/')}: ${text.replace(/\s+/g, ' ').slice(0, 100)}`,
      ),
    );
    expect(offenders).toEqual([]);
  });
});
