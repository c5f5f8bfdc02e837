/**
 * A streaming checker of JSON text (RFC 8259 grammar), for outputs too large
 * for one string (`JSON.parse` cannot take them): bytes are fed in chunks; at
 * the end it says whether the text was exactly one well-formed JSON value and
 * reports the length of every array of at least `minArray` elements with its
 * path (`fits.*.points.residual`; array indices written `*`).
 */

/** `at`: the key being read in an object (`*` in an array), for the paths of nested arrays. */
type Frame = { kind: 'object'; at: string; state: 'first' | 'key' | 'colon' | 'value' | 'after' } | { kind: 'array'; at: '*'; count: number; state: 'first' | 'value' | 'after' };

/**
 * The number grammar -?(0|[1-9][0-9]*)(.[0-9]+)?([eE][+-]?[0-9]+)? as a DFA over bytes (no strings built):
 * NUMBER_NEXT[state * 256 + byte] is the next state or -1; states 2, 3, 5 and 8 accept.
 */
const NUMBER_NEXT = new Int8Array(9 * 256).fill(-1);
const NUMBER_ACCEPTS = [false, false, true, true, false, true, false, false, true];
{
  const set = (from: number, chars: string, to: number) => {
    for (const c of chars) NUMBER_NEXT[from * 256 + c.charCodeAt(0)] = to;
  };
  const digits = '0123456789';
  const nonZero = '123456789';
  set(0, '-', 1);
  set(0, '0', 2);
  set(0, nonZero, 3);
  set(1, '0', 2);
  set(1, nonZero, 3);
  for (const s of [2, 3]) {
    set(s, '.', 4);
    set(s, 'eE', 6);
  }
  set(3, digits, 3);
  set(4, digits, 5);
  set(5, digits, 5);
  set(5, 'eE', 6);
  set(6, '+-', 7);
  set(6, digits, 8);
  set(7, digits, 8);
  set(8, digits, 8);
}
const WS = new Uint8Array(256);
for (const c of ' \n\r\t') WS[c.charCodeAt(0)] = 1;
const NUMBER_CHAR = new Uint8Array(256);
for (const c of '0123456789+-.eE') NUMBER_CHAR[c.charCodeAt(0)] = 1;

export class JsonStreamChecker {
  private readonly stack: Frame[] = [];
  private done = false;
  private error: string | null = null;
  private offset = 0;
  /** Inside a string: 0 no, 1 yes, 2 after a backslash, 3..6 reading \\u hex digits. */
  private inString = 0;
  private stringIsKey = false;
  private keyText = '';
  private token = '';
  private tokenKind: 'number' | 'literal' | null = null;
  /** DFA state of the number being read. */
  private numberState = 0;
  readonly arrays: { path: string; length: number }[] = [];

  constructor(private readonly minArray = 1000) {}


  private fail(message: string): void {
    if (this.error === null) this.error = `${message} at byte ${this.offset}`;
  }

  /** A value ends: move the enclosing frame on. */
  private valueDone(): void {
    const top = this.stack[this.stack.length - 1];
    if (!top) this.done = true;
    else if (top.kind === 'array') {
      top.count++;
      top.state = 'after';
    } else top.state = 'after';
  }

  /** A value may start here (checks the enclosing frame's state). */
  private valueStarts(): boolean {
    const top = this.stack[this.stack.length - 1];
    if (!top) {
      if (this.done) this.fail('text after the value');
      return !this.done;
    }
    if (top.kind === 'array' ? top.state === 'after' : top.state !== 'value') {
      this.fail('unexpected value');
      return false;
    }
    return true;
  }

  private endToken(): void {
    if (this.tokenKind === 'number' ? !NUMBER_ACCEPTS[this.numberState] : !['true', 'false', 'null'].includes(this.token)) this.fail(this.tokenKind === 'number' ? 'bad number' : `bad token ${this.token.slice(0, 20)}`);
    this.token = '';
    this.tokenKind = null;
    this.valueDone();
  }

  feed(chunk: Uint8Array): void {
    for (let i = 0; i < chunk.length && this.error === null; i++, this.offset++) {
      const b = chunk[i];
      if (this.inString) {
        if (this.inString === 1) {
          if (b === 0x22) {
            this.inString = 0;
            if (this.stringIsKey) {
              const top = this.stack[this.stack.length - 1] as Extract<Frame, { kind: 'object' }>;
              top.at = this.keyText;
              top.state = 'colon';
            } else this.valueDone();
          } else if (b === 0x5c) this.inString = 2;
          else if (b < 0x20) this.fail('control character in a string');
          else if (this.stringIsKey && this.keyText.length < 80) this.keyText += String.fromCharCode(b);
        } else if (this.inString === 2) {
          if (b === 0x75) this.inString = 3;
          else if ('"\\/bfnrt'.includes(String.fromCharCode(b))) this.inString = 1;
          else this.fail('bad escape');
        } else {
          if (!/[0-9a-fA-F]/.test(String.fromCharCode(b))) this.fail('bad \\u escape');
          this.inString = this.inString === 6 ? 1 : this.inString + 1;
        }
        continue;
      }
      if (this.tokenKind === 'number') {
        if (NUMBER_CHAR[b]) {
          // the rest of the number in a tight loop
          let state = this.numberState;
          while (i < chunk.length && NUMBER_CHAR[chunk[i]] && state >= 0) {
            state = NUMBER_NEXT[state * 256 + chunk[i]];
            i++;
            this.offset++;
          }
          i--;
          this.offset--;
          this.numberState = state;
          if (state < 0) this.fail('bad number');
          continue;
        }
        this.endToken();
        if (this.error !== null) break;
      } else if (this.tokenKind !== null) {
        if (b >= 0x61 && b <= 0x7a) {
          this.token += String.fromCharCode(b);
          continue;
        }
        this.endToken();
        if (this.error !== null) break;
      }
      if (WS[b]) continue;
      const top = this.stack[this.stack.length - 1];
      switch (b) {
        case 0x7b: // {
        case 0x5b: // [
          if (!this.valueStarts()) break;
          this.stack.push(b === 0x7b ? { kind: 'object', at: '', state: 'first' } : { kind: 'array', at: '*', count: 0, state: 'first' });
          break;
        case 0x7d: // }
          if (top?.kind !== 'object' || (top.state !== 'after' && top.state !== 'first')) {
            this.fail('unexpected }');
            break;
          }
          this.stack.pop();
          this.valueDone();
          break;
        case 0x5d: // ]
          if (top?.kind !== 'array' || top.state === 'value') {
            this.fail('unexpected ]');
            break;
          }
          if (top.count >= this.minArray) this.arrays.push({ path: this.stack.slice(0, -1).map((f) => f.at).join('.'), length: top.count });
          this.stack.pop();
          this.valueDone();
          break;
        case 0x2c: // ,
          if (!top || top.state !== 'after') this.fail('unexpected ,');
          else if (top.kind === 'array') top.state = 'value';
          else top.state = 'key';
          break;
        case 0x3a: // :
          if (top?.kind !== 'object' || top.state !== 'colon') this.fail('unexpected :');
          else top.state = 'value';
          break;
        case 0x22: // "
          if (top?.kind === 'object' && (top.state === 'key' || top.state === 'first')) {
            this.stringIsKey = true;
            this.keyText = '';
          } else {
            if (!this.valueStarts()) break;
            this.stringIsKey = false;
          }
          this.inString = 1;
          break;
        default:
          if (!this.valueStarts()) break;
          if (NUMBER_CHAR[b]) {
            this.tokenKind = 'number';
            this.numberState = NUMBER_NEXT[b];
            this.token = '';
            if (this.numberState < 0) this.fail('bad number');
            break;
          }
          if (b >= 0x61 && b <= 0x7a) this.tokenKind = 'literal';
          else {
            this.fail(`unexpected byte 0x${b.toString(16)}`);
            break;
          }
          this.token = String.fromCharCode(b);
      }
    }
  }

  /** After the last chunk: null when the text was one well-formed value, else what was wrong. */
  end(): string | null {
    if (this.tokenKind !== null && this.error === null) this.endToken();
    if (this.error === null && (this.inString || this.stack.length || !this.done)) this.fail('text ends inside a value');
    return this.error;
  }
}
