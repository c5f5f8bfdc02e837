import { afterAll, describe, expect, it } from 'vitest';
import { runCli, COMMANDS, VERSION } from '../../../engine/front/cli/main';
import { EXIT, type CliIo } from '../../../engine/front/cli/io';
import { closest, parseCommandArgs } from '../../../engine/front/cli/args';
import { cleanTemp, cli, hasStackTrace, tempDir } from './helpers';
import pkg from '../../../package.json';

afterAll(cleanTemp);

describe('cli/main', () => {
  const cwd = tempDir();

  it('prints help for the tool and every command with exit 0', async () => {
    const main = await cli(cwd, '--help');
    expect(main.code).toBe(EXIT.ok);
    expect(main.stdout).toMatch(/^Usage: leastwise <command>/);
    for (const name of Object.keys(COMMANDS)) {
      const r = await cli(cwd, name, '--help');
      expect(r.code).toBe(EXIT.ok);
      expect(r.stdout).toContain(`Usage: leastwise ${name}`);
      expect(r.stderr).toBe('');
    }
    expect((await cli(cwd, 'help', 'fit')).stdout).toContain('Usage: leastwise fit');
  });

  it('prints the package version', async () => {
    const r = await cli(cwd, '--version');
    expect(r.stdout).toBe(`leastwise ${pkg.version}\n`);
    expect(VERSION).toBe(pkg.version);
  });

  it('rejects unknown commands and options with exit 2 and a suggestion', async () => {
    const r = await cli(cwd, 'fti', 'x.lsq');
    expect(r.code).toBe(EXIT.inputError);
    expect(r.stderr).toBe("error: unknown command 'fti' - did you mean 'fit'? (see leastwise --help)\n");
    const o = await cli(cwd, 'fit', '--colour', 'x.lsq');
    expect(o.code).toBe(EXIT.inputError);
    expect(o.stderr).toMatch(/^error: unknown option '--colour' \(see leastwise fit --help\)\n$/);
    const none = await cli(cwd);
    expect(none.code).toBe(EXIT.inputError);
    expect(none.stderr).toContain('Usage:');
  });

  it('turns an unexpected failure into one error line with exit 2', async () => {
    const io: CliIo = {
      stdout: () => {
        throw new Error('disk on fire\n    at somewhere (x.js:1:2)');
      },
      stderr: (t) => void err.push(t),
      stderrIsTTY: false,
      cwd,
    };
    const err: string[] = [];
    const code = await runCli(['--help'], io);
    expect(code).toBe(EXIT.inputError);
    expect(err.join('')).toBe('error: internal error: disk on fire (please report this with the spec and data)\n');
    expect(hasStackTrace(err.join(''))).toBe(false);
  });
});

describe('cli/args', () => {
  it('parses with util.parseArgs and reports unknown options', () => {
    const ok = parseCommandArgs<{ out?: string }>('new', ['a.csv', '--out', 'b.lsq'], { out: { type: 'string' } });
    expect(ok).toEqual({ ok: true, values: { out: 'b.lsq' }, positionals: ['a.csv'] });
    const bad = parseCommandArgs('new', ['--x'], { x: { type: 'string' } });
    expect(bad.ok).toBe(false);
  });

  it('suggests commands and templates by the parser\'s one "did you mean" rule (parser/suggest.ts)', () => {
    expect(closest('fti', ['check', 'plan', 'fit', 'new'])).toBe('fit'); // a transposition
    expect(closest('chek', ['check', 'plan', 'fit', 'new'])).toBe('check');
    expect(closest('zzzzzz', ['check', 'plan'])).toBeNull();
  });
});
