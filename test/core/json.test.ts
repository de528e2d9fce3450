// The one JSON replacer (sim/core/json.ts) of summary.json, sweep.json, results.json and --json.
import { describe, it, expect } from 'vitest';
import { finiteOrNull } from '../../sim/core/json.js';

describe('finiteOrNull', () => {
  it('writes Infinity and NaN as null (RFC 8259 numbers have no form for them) and leaves the rest', () => {
    expect(JSON.stringify({ a: Infinity, b: -Infinity, c: NaN, d: [1.5, NaN, -0], e: 'x', f: null, g: { h: 1e308 } }, finiteOrNull))
      .toBe('{"a":null,"b":null,"c":null,"d":[1.5,null,0],"e":"x","f":null,"g":{"h":1e+308}}');
  });
});
