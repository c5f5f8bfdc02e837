/**
 * Offset spans (as computed on an analysed text) to vscode ranges. Uses the
 * analysed text, not the live document, so a range stays consistent with the
 * analysis that produced it even while the user keeps typing.
 */
import * as vscode from 'vscode';
import { LineIndex } from '../../parser/source';
import type { Span } from '../logic/text';

const indexes = new WeakMap<object, LineIndex>();

/** Line index of `text`, cached per analysis object (`owner`). */
export function lineIndex(owner: object, text: string): LineIndex {
  let idx = indexes.get(owner);
  if (!idx || idx.text !== text) {
    idx = new LineIndex(text);
    indexes.set(owner, idx);
  }
  return idx;
}

export function toRange(idx: LineIndex, span: Span): vscode.Range {
  const a = idx.position(span.start);
  const b = idx.position(Math.max(span.start, span.end));
  return new vscode.Range(a.line - 1, a.column - 1, b.line - 1, b.column - 1);
}
