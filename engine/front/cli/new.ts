/**
 * `leastwise new DATA.csv [--x COL --y COL --model ID [--degree N]] [--out FILE]`: write a
 * starter spec from a template with starting values computed from the data.
 * The spec goes through engine/io like every output: checked against the CSV
 * by file identity, written to a temporary file and linked into place only
 * when the name is free (existing files are never overwritten).
 */
import { basename, dirname, extname, join, relative, resolve, sep } from 'node:path';
import { sampleDataFile, SAMPLE_ROWS, type DataTable } from '../../data/index';
import { clashMessage, inputStatus, OutputError, OutputGuard, TargetExistsError, writeAllOrNothing } from '../../io/index';
import { findTemplate, MAX_POLY_DEGREE, scaffoldSpec, templateIds } from '../../templates/index';
import { closest, parseCommandArgs } from './args';
import { EXIT, type CliIo, type ExitCode } from './io';
import { displayPath, located, plainError } from './located-lines';
import { HELP, MSG } from './messages';

interface NewValues {
  x?: string;
  y?: string;
  model?: string;
  degree?: string;
  out?: string;
}

function numericColumns(t: DataTable): string[] {
  return t.columns.filter((c) => c.values.some((v) => Number.isFinite(v))).map((c) => c.name);
}

export async function newCommand(argv: string[], io: CliIo): Promise<ExitCode> {
  const args = parseCommandArgs<NewValues>('new', argv, { x: { type: 'string' }, y: { type: 'string' }, model: { type: 'string' }, degree: { type: 'string' }, out: { type: 'string' } });
  const fail = (line: string): ExitCode => {
    io.stderr(line + '\n');
    return EXIT.inputError;
  };
  if (!args.ok) return fail(plainError(args.message));
  if (args.values.help) {
    io.stdout(HELP.new());
    return EXIT.ok;
  }
  if (args.positionals.length !== 1) return fail(plainError(args.positionals.length ? MSG.oneFile('new') : MSG.needFiles('new')));

  const modelId = args.values.model ?? 'line';
  let degree: number | undefined;
  if (args.values.degree !== undefined) {
    degree = Number(args.values.degree);
    if (modelId !== 'polynomial') return fail(plainError(MSG.degreeWithoutPolynomial()));
    if (!(Number.isInteger(degree) && degree >= 1 && degree <= MAX_POLY_DEGREE)) return fail(plainError(MSG.badDegree(args.values.degree, MAX_POLY_DEGREE)));
  }
  const template = findTemplate(modelId, { degree });
  if (!template) return fail(plainError(MSG.unknownTemplate(modelId, closest(modelId, templateIds()))));

  const csvPath = resolve(io.cwd, args.positionals[0]);
  const csvDisplay = displayPath(csvPath, io.cwd);
  const status = inputStatus(csvPath); // regular files only (engine/io; the reader below checks again on the open file)
  if (!status.ok) return fail(located(csvDisplay, undefined, undefined, 'error', MSG.cannotRead(status.error.message)));
  // the header and the first rows only, streamed: a file of any size costs the same
  const parsed = sampleDataFile(csvPath, { displayPath: csvDisplay });
  if (!parsed.ok) {
    for (const e of parsed.errors) io.stderr(located(csvDisplay, e.row, undefined, 'error', e.message) + '\n');
    return EXIT.inputError;
  }
  const table = parsed.table;
  const numeric = numericColumns(table);
  const pick = (name: string | undefined, exclude?: string): string | { error: string } => {
    if (name !== undefined) {
      if (!table.headers.includes(name)) return { error: MSG.unknownColumn(name, table.headers) };
      if (!numeric.includes(name)) return { error: MSG.notNumeric(name) };
      return name;
    }
    const found = numeric.find((c) => c !== exclude);
    return found ?? { error: MSG.needTwoNumeric() };
  };
  const x = pick(args.values.x, args.values.y);
  if (typeof x !== 'string') return fail(located(csvDisplay, 1, undefined, 'error', x.error));
  const y = pick(args.values.y, x);
  if (typeof y !== 'string') return fail(located(csvDisplay, 1, undefined, 'error', y.error));
  if (x === y) return fail(plainError(MSG.sameColumn(x)));

  const toStdout = args.values.out === '-';
  const outPath = toStdout ? csvPath.slice(0, csvPath.length - extname(csvPath).length) + '.lsq'
    : args.values.out !== undefined ? resolve(io.cwd, args.values.out)
      : join(dirname(csvPath), basename(csvPath, extname(csvPath)) + '.lsq');
  const dataPath = relative(dirname(outPath), csvPath).split(sep).join('/');
  const column = (name: string) => table.columns.find((c) => c.name === name)!.values;
  const result = scaffoldSpec({ template, dataPath, headers: table.headers, x, y, xValues: column(x), yValues: column(y) });
  if (!result.ok) return fail(located(csvDisplay, undefined, undefined, 'error', result.message));

  if (toStdout) {
    io.stdout(result.text);
    return EXIT.ok;
  }
  const outDisplay = displayPath(outPath, io.cwd);
  const clashes = new OutputGuard([{ role: 'file', path: csvPath }]).check([{ path: outPath, what: '--out' }]);
  if (clashes.length) return fail(plainError(clashMessage(clashes[0], (p) => displayPath(p, io.cwd))));
  try {
    writeAllOrNothing([{ path: outPath, content: result.text, exclusive: true }], io.writeHooks);
  } catch (e) {
    if (e instanceof TargetExistsError) return fail(plainError(MSG.exists(outDisplay)));
    return fail(plainError(MSG.cannotWrite(outDisplay, e instanceof OutputError ? e.code : String(e))));
  }
  io.stdout(MSG.scaffolded(outDisplay, template.title, y, x) + (parsed.complete ? '' : ` ${MSG.sampled(SAMPLE_ROWS)}`) + '\n');
  return EXIT.ok;
}
