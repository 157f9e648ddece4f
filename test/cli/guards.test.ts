/**
 * The command line's edge rules as pure functions: repeated options,
 * negative values, control characters, non-finite numbers, and decoding of
 * users' text files.
 */
import { describe, expect, test } from 'vitest';
import { assertFiniteText, checkRepeatedOptions, finiteJson, joinNegativeValues, NonFiniteResult, sanitiseForTerminal } from '../../src/cli/guards.js';
import { decodeUserText } from '../../src/io/read-user-file.js';

describe('repeated options', () => {
  test('a single-valued option twice is refused, in any spelling', () => {
    expect(() => checkRepeatedOptions(['evaluate', '--gaps', '1.7', '--gaps', '1.1'])).toThrow(/--gaps is given twice/);
    expect(() => checkRepeatedOptions(['report', 'd.yaml', '-o', 'a.html', '--output=b.html'])).toThrow(/--output is given twice/);
    expect(() => checkRepeatedOptions(['evaluate', '--top-absorptance', '0.5', '--topAbsorptance', '0.6'])).toThrow(/--top-absorptance is given twice/);
  });
  test('repeatable options, positionals and words after -- pass', () => {
    expect(() => checkRepeatedOptions(['optimize', '--fix', '1=1.7', '--fix', '2=1.1', '--range', '1=1:2', '--range', '2=0.5:1'])).not.toThrow();
    expect(() => checkRepeatedOptions(['report', 'a.yaml', '--', '--gaps', '--gaps'])).not.toThrow();
  });
});

describe('negative values', () => {
  test('a value starting with a minus and a digit joins the option before it', () => {
    expect(joinNegativeValues(['map', '--x', '-1:2', '--y', '0.5:1'])).toEqual(['map', '--x=-1:2', '--y', '0.5:1']);
    expect(joinNegativeValues(['evaluate', '--irradiance', '-.5'])).toEqual(['evaluate', '--irradiance=-.5']);
    expect(joinNegativeValues(['evaluate', '--json', '-h'])).toEqual(['evaluate', '--json', '-h']);
    expect(joinNegativeValues(['x', '--', '--y', '-1'])).toEqual(['x', '--', '--y', '-1']);
  });
});

describe('text for a terminal', () => {
  test('ESC, BEL and C1 controls are shown as \\xNN; newline and tab stay', () => {
    expect(sanitiseForTerminal('a\x1b[31mred\x07\tb\nc\u009b')).toBe('a\\x1b[31mred\\x07\tb\nc\\x9b');
  });
});

describe('non-finite results', () => {
  test('finiteJson refuses NaN and infinities that JSON.stringify would print as null', () => {
    expect(finiteJson({ a: [1, 2] }, null, 2)).toBe(JSON.stringify({ a: [1, 2] }, null, 2));
    expect(() => finiteJson({ efficiency: NaN })).toThrow(NonFiniteResult);
    expect(() => finiteJson({ yield: { kwh: Infinity } })).toThrow(/field "kwh"/);
  });
  test('assertFiniteText finds "NaN %" and "Infinity kWh/m²" but not words that contain them', () => {
    expect(() => assertFiniteText('Efficiency NaN %')).toThrow(/output line 1/);
    expect(() => assertFiniteText('ok\nYield Infinity kWh/m²')).toThrow(/output line 2/);
    expect(() => assertFiniteText('Efficiency 45.04 % (NaNoWire-free, InfinityLab)')).not.toThrow();
  });
});

describe('decoding users\' text files', () => {
  test('a UTF-8 byte-order mark is dropped', () => {
    expect(decodeUserText('f.json', Buffer.from('\ufeff{"a":1}', 'utf8'), 'design file')).toBe('{"a":1}');
  });
  test('UTF-16 with or without a mark, and binary data, are refused on line 1 or the line of the first NUL', () => {
    expect(() => decodeUserText('f.yaml', Buffer.concat([Buffer.from([0xff, 0xfe]), Buffer.from('a: 1', 'utf16le')]), 'design file')).toThrow(/f\.yaml:1: is UTF-16 encoded/);
    expect(() => decodeUserText('f.yaml', Buffer.from('name: x\n', 'utf16le'), 'design file')).toThrow(/f\.yaml:1: looks UTF-16/);
    expect(() => decodeUserText('f.csv', Buffer.concat([Buffer.from('a,b\n1,2\n3,4\n5,6\nlong text line here\n'), Buffer.from([0, 1])]), 'spectrum file')).toThrow(/f\.csv:6: contains binary data/);
  });
});
