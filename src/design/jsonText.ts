/**
 * JSON text to a plain value, with problems reported by line and column. A small scanner (RFC 8259
 * grammar) checks the text first: syntax errors (the engine's own messages do not always carry a
 * position), duplicate keys in one object (RFC 8259 leaves their meaning open; JSON.parse silently
 * keeps the last) and nesting deeper than any design needs (which would exhaust the parser's stack).
 * `JSON.parse` then does the parsing.
 */

/** Deepest nesting of objects and arrays accepted; designs use about five levels. */
export const MAX_JSON_DEPTH = 64;
import { UserError } from '../errors.js';

interface SyntaxProblem {
  offset: number;
  expected: string;
  /** 'syntax': not JSON at all; 'structure': valid JSON this program refuses (duplicate key, nesting). */
  kind: 'syntax' | 'structure';
}

class JsonScanner {
  private offset = 0;
  private depth = 0;
  constructor(private readonly text: string) {}

  /** Offset and description of the first syntax error, or null when the text is valid JSON. */
  findProblem(): SyntaxProblem | null {
    try {
      this.skipSpace();
      this.value();
      this.skipSpace();
      if (this.offset < this.text.length) this.fail('end of input after the top-level value');
      return null;
    } catch (problem) {
      if (problem instanceof ScanFailure) return problem.problem;
      throw problem;
    }
  }

  private fail(expected: string, kind: SyntaxProblem['kind'] = 'syntax'): never {
    throw new ScanFailure({ offset: this.offset, expected, kind });
  }

  private skipSpace(): void {
    while (this.offset < this.text.length && ' \t\n\r'.includes(this.text[this.offset]!)) this.offset++;
  }

  private value(): void {
    const c = this.text[this.offset];
    if ((c === '{' || c === '[') && this.depth >= MAX_JSON_DEPTH) this.fail(`nesting no deeper than ${MAX_JSON_DEPTH} levels`, 'structure');
    if (c === '{') this.nested(() => this.object());
    else if (c === '[') this.nested(() => this.array());
    else if (c === '"') this.string();
    else if (c === '-' || (c !== undefined && c >= '0' && c <= '9')) this.number();
    else if (!this.literal('true') && !this.literal('false') && !this.literal('null')) {
      this.fail('a value (object, array, string, number, true, false or null)');
    }
  }

  private nested(scan: () => void): void {
    this.depth++;
    scan();
    this.depth--;
  }

  private literal(word: string): boolean {
    if (!this.text.startsWith(word, this.offset)) return false;
    this.offset += word.length;
    return true;
  }

  private object(): void {
    this.offset++;
    this.skipSpace();
    if (this.text[this.offset] === '}') {
      this.offset++;
      return;
    }
    const keys = new Set<string>();
    for (;;) {
      if (this.text[this.offset] !== '"') this.fail('a double-quoted property name');
      const keyStart = this.offset;
      this.string();
      const key = JSON.parse(this.text.slice(keyStart, this.offset)) as string;
      if (keys.has(key)) {
        this.offset = keyStart;
        this.fail(`no duplicate key ("${key}" appears twice in this object; JSON keeps only the last)`, 'structure');
      }
      keys.add(key);
      this.skipSpace();
      if (this.text[this.offset] !== ':') this.fail("':' after the property name");
      this.offset++;
      this.skipSpace();
      this.value();
      this.skipSpace();
      const c = this.text[this.offset];
      this.offset++;
      if (c === '}') return;
      if (c !== ',') {
        this.offset--;
        this.fail("',' or '}' after the property value");
      }
      this.skipSpace();
    }
  }

  private array(): void {
    this.offset++;
    this.skipSpace();
    if (this.text[this.offset] === ']') {
      this.offset++;
      return;
    }
    for (;;) {
      this.value();
      this.skipSpace();
      const c = this.text[this.offset];
      this.offset++;
      if (c === ']') return;
      if (c !== ',') {
        this.offset--;
        this.fail("',' or ']' after the array element");
      }
      this.skipSpace();
    }
  }

  private string(): void {
    this.offset++;
    while (this.offset < this.text.length) {
      const c = this.text[this.offset]!;
      if (c === '"') {
        this.offset++;
        return;
      }
      if (c === '\\') {
        const escape = this.text[this.offset + 1] ?? '';
        if (escape === 'u' && /^[0-9a-fA-F]{4}$/.test(this.text.slice(this.offset + 2, this.offset + 6))) this.offset += 6;
        else if ('"\\/bfnrt'.includes(escape) && escape !== '') this.offset += 2;
        else this.fail('a valid escape sequence');
      } else if (c < ' ') {
        this.fail('no control characters inside a string');
      } else {
        this.offset++;
      }
    }
    this.fail('a closing double quote');
  }

  private number(): void {
    const match = /^-?(?:0|[1-9]\d*)(?:\.\d+)?(?:[eE][+-]?\d+)?/.exec(this.text.slice(this.offset));
    if (!match) this.fail('a number');
    this.offset += match[0].length;
  }
}

class ScanFailure extends Error {
  constructor(readonly problem: SyntaxProblem) {
    super(problem.expected);
  }
}

/** 1-based line and column of a character offset. */
export function lineAndColumn(text: string, offset: number): { line: number; column: number } {
  const before = text.slice(0, offset);
  const line = before.split('\n').length;
  const column = offset - (before.lastIndexOf('\n') + 1) + 1;
  return { line, column };
}

/** Parse JSON text; a syntax error, duplicate key or runaway nesting becomes a `UserError` naming file, line and column. */
export function parseJsonText(text: string, fileName: string): unknown {
  const body = text.charCodeAt(0) === 0xfeff ? text.slice(1) : text; // tolerate a UTF-8 byte-order mark
  if (body.trim() === '') throw new UserError(`${fileName}: file is empty (expected a JSON object)`);
  const problem = new JsonScanner(body).findProblem();
  if (problem !== null) {
    const { line, column } = lineAndColumn(body, problem.offset);
    const found = problem.offset < body.length ? JSON.stringify(body[problem.offset]) : 'end of file';
    const what = problem.kind === 'syntax' ? 'JSON syntax error' : 'JSON refused';
    throw new UserError(`${fileName}: ${what} at line ${line}, column ${column}: expected ${problem.expected}, found ${found}`);
  }
  return JSON.parse(body) as unknown;
}
