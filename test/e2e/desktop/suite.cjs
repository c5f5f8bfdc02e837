// The end-to-end scenario through the VS Code API (loaded by @vscode/test-electron
// in the extension host; see run.cjs). No sleeps: each step waits for an event
// or a condition. Prints "N passed, N failed" and rejects on failure.
'use strict';
const path = require('path');
const vscode = require('vscode');

const TIMEOUT_MS = 60000;

/** Resolves when `probe()` is truthy, re-checking on `event`; rejects after TIMEOUT_MS. */
function until(event, probe, what) {
  return new Promise((resolve, reject) => {
    const first = probe();
    if (first) return resolve(first);
    const timer = setTimeout(() => { sub.dispose(); reject(new Error(`timed out waiting for ${what}`)); }, TIMEOUT_MS);
    const sub = event(() => {
      const v = probe();
      if (v) { clearTimeout(timer); sub.dispose(); resolve(v); }
    });
  });
}

async function run() {
  const results = [];
  const check = (name, ok, detail) => {
    results.push(ok);
    console.log(`${ok ? 'ok  ' : 'FAIL'} ${name}${detail ? ` — ${detail}` : ''}`);
  };
  try {
    const ws = process.env.LEASTWISE_E2E_WORKSPACE;
    const uri = vscode.Uri.file(path.join(ws, 'cooling.lsq'));
    const doc = await vscode.workspace.openTextDocument(uri);
    const editor = await vscode.window.showTextDocument(doc);
    check('spec opens as the lsq language', doc.languageId === 'lsq', doc.languageId);
    const ext = vscode.extensions.all.find((e) => e.packageJSON.name === 'leastwise');
    await ext.activate();
    check('extension active', ext.isActive);

    // typo in a column name -> error with a "did you mean" quick fix
    const line = doc.getText().split(/\r?\n/).findIndex((l) => /^\s*sigma\s+temp_sd\s*$/.test(l));
    const end = doc.lineAt(line).range.end;
    await editor.edit((e) => e.insert(end, 'x'));
    const errors = await until(vscode.languages.onDidChangeDiagnostics, () => {
      const d = vscode.languages.getDiagnostics(uri).filter((x) => x.severity === vscode.DiagnosticSeverity.Error);
      return d.length ? d : null;
    }, 'the unknown_column error');
    check('unknown column reported', errors[0].message.includes('temp_sdx'), errors[0].message);
    const actions = await vscode.commands.executeCommand('vscode.executeCodeActionProvider', uri, errors[0].range, vscode.CodeActionKind.QuickFix.value);
    const fix = (actions || []).find((a) => a.title === "Change to 'temp_sd'");
    check('quick fix offered', Boolean(fix), (actions || []).map((a) => a.title).join(', '));
    if (fix) await vscode.workspace.applyEdit(fix.edit);
    await until(vscode.languages.onDidChangeDiagnostics, () => vscode.languages.getDiagnostics(uri).every((x) => x.severity !== vscode.DiagnosticSeverity.Error) || null, 'the error to clear');
    check('error cleared after the fix', true);

    // completion in the model expression
    const model = doc.getText().split(/\r?\n/).findIndex((l) => /^\s*model\b/.test(l));
    const items = await vscode.commands.executeCommand('vscode.executeCompletionItemProvider', uri, new vscode.Position(model, doc.lineAt(model).text.length - 1));
    const labels = items.items.map((i) => (typeof i.label === 'string' ? i.label : i.label.label));
    check('completion offers parameters and columns', labels.includes('tau') && labels.includes('time_min'), labels.slice(0, 12).join(', '));

    // fit, then hover a parameter
    const ok = await vscode.commands.executeCommand('leastwise.fitFile', uri);
    check('Fit This File returned a result', ok === true);
    const tauLine = doc.getText().split(/\r?\n/).findIndex((l) => /^\s*param\s+tau\b/.test(l));
    const hovers = await vscode.commands.executeCommand('vscode.executeHoverProvider', uri, new vscode.Position(tauLine, doc.lineAt(tauLine).text.indexOf('tau') + 1));
    const text = hovers.flatMap((h) => h.contents.map((c) => (typeof c === 'string' ? c : c.value))).join('\n');
    check('hover shows estimate ± standard error', text.includes('±'), text.split('\n').find((l) => l.includes('±')));
  } catch (e) {
    check('no exception', false, e.message);
  }
  const passed = results.filter(Boolean).length;
  console.log(`${passed} passed, ${results.length - passed} failed`);
  if (passed !== results.length) throw new Error(`${results.length - passed} end-to-end checks failed`);
}

module.exports = { run };
