// JSON text as people write it: a UTF-8 byte-order mark is accepted, and a syntax error says
// where it is by line and column (JavaScript's own message gives a character offset at best,
// and sometimes echoes the text instead, which may be a whole binary file).

/** A JSON syntax error, placed by line and column (1-based) in the text. */
export class JsonSyntaxError extends Error {
  override name = 'JsonSyntaxError';
  readonly line: number;
  readonly column: number;
  constructor(reason: string, line: number, column: number) {
    super(`not valid JSON: ${reason} at line ${line}, column ${column}`);
    this.line = line;
    this.column = column;
  }
}

/** JSON.parse after dropping a leading byte-order mark; errors are JsonSyntaxErrors with line and column. */
export function parseJsonText(text: string): unknown {
  const body = text.charCodeAt(0) === 0xfeff ? text.slice(1) : text;
  try {
    return JSON.parse(body);
  } catch {
    const { offset, reason } = locateError(body);
    const before = body.slice(0, offset).split('\n');
    throw new JsonSyntaxError(reason, before.length, before[before.length - 1].length + 1);
  }
}

/** Where JSON.parse failed and why, found by a plain recursive-descent scan of the grammar (RFC 8259). */
function locateError(s: string): { offset: number; reason: string } {
  let k = 0;
  const fail = (reason: string): never => {
    throw { offset: k, reason };
  };
  const describe = (): string => (k >= s.length ? 'the text ends too early' : `unexpected ${JSON.stringify(s[k])}`);
  const space = (): void => {
    while (k < s.length && ' \t\n\r'.includes(s[k])) k++;
  };
  const literal = (word: string): void => {
    if (s.startsWith(word, k)) k += word.length;
    else fail(describe());
  };
  const string = (): void => {
    k++; // the opening quote
    while (k < s.length && s[k] !== '"') {
      if (s.charCodeAt(k) < 0x20) fail('a control character (such as a line break) inside a string');
      if (s[k] === '\\') {
        k++;
        if (s[k] === 'u') {
          if (!/^[0-9a-fA-F]{4}$/.test(s.slice(k + 1, k + 5))) fail('a bad \\u escape in a string');
          k += 4;
        } else if (!'"\\/bfnrt'.includes(s[k] ?? '')) fail('a bad escape in a string');
      }
      k++;
    }
    if (k >= s.length) fail('a string that is never closed');
    k++;
  };
  const number = (): void => {
    const m = /^-?(0|[1-9]\d*)(\.\d+)?([eE][+-]?\d+)?/.exec(s.slice(k));
    if (!m) fail(describe());
    k += m![0].length;
  };
  const value = (): void => {
    space();
    const c = s[k];
    if (c === '{') {
      k++;
      space();
      if (s[k] === '}') return void k++;
      for (;;) {
        space();
        if (s[k] !== '"') fail(`${describe()} where a property name in double quotes belongs`);
        string();
        space();
        if (s[k] !== ':') fail(`${describe()} where ":" belongs`);
        k++;
        value();
        space();
        if (s[k] === ',') { k++; continue; }
        if (s[k] === '}') return void k++;
        fail(`${describe()} where "," or "}" belongs`);
      }
    }
    if (c === '[') {
      k++;
      space();
      if (s[k] === ']') return void k++;
      for (;;) {
        value();
        space();
        if (s[k] === ',') { k++; continue; }
        if (s[k] === ']') return void k++;
        fail(`${describe()} where "," or "]" belongs`);
      }
    }
    if (c === '"') return string();
    if (c === 't') return literal('true');
    if (c === 'f') return literal('false');
    if (c === 'n') return literal('null');
    if (c === '-' || (c >= '0' && c <= '9')) return number();
    fail(k >= s.length ? 'the text ends where a value belongs' : `${describe()} where a value belongs`);
  };
  try {
    value();
    space();
    if (k < s.length) fail(`${describe()} after the end of the JSON value`);
    return { offset: 0, reason: 'rejected by the JSON parser' };
  } catch (error) {
    return error as { offset: number; reason: string };
  }
}
