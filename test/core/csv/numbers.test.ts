import * as assert from 'node:assert/strict';
import { parseDecimal, parseIsoDate } from '../../../src/core/csv/numbers';

describe('csv cell numbers', () => {
  it('reads plain decimals to the same double as ECMAScript Number() (the spec rounds correctly)', () => {
    const cells = [
      '0', '-0', '+7', '007', '3.14159', '-2.5', '.5', '5.', '1e3', '1E-3', '-1.25e+2', '123456789012345678',
      '0.1', '0.30000000000000004', '9007199254740993', '1.7976931348623157e308', '5e-324', '2.2250738585072014e-308',
      '123.456e-30', '0.000001234', '99999999999999999999', '4.35',
    ];
    for (const c of cells) assert.ok(Object.is(parseDecimal(c), Number(c)), `${c}: ${parseDecimal(c)} vs ${Number(c)}`);
  });

  it('agrees with Number() on random decimals of every length, including past the fast path', () => {
    let seed = 12345;
    const next = () => (seed = (Math.imul(seed, 1103515245) + 12345) >>> 0);
    for (let i = 0; i < 20000; i++) {
      const digits = 1 + (next() % 19);
      let s = next() % 2 ? '-' : '';
      for (let d = 0; d < digits; d++) s += String(next() % 10);
      const point = next() % (digits + 1);
      if (point < digits) s = s.slice(0, s.length - point) + '.' + s.slice(s.length - point);
      if (next() % 4 === 0) s += `e${(next() % 60) - 30}`;
      assert.ok(Object.is(parseDecimal(s), Number(s)), s);
    }
  });

  it('rejects what Number() would turn into a number but a CSV cell means as text', () => {
    for (const c of ['', ' ', '0x1A', '0b101', '0o7', 'Infinity', '-Infinity', 'NaN', '1e', '1e+', '.', '-', '+', '1.2.3', '1,5', '12abc', '1 2', '1e400', '--1', '١٢']) {
      assert.ok(Number.isNaN(parseDecimal(c)), `${JSON.stringify(c)} gave ${parseDecimal(c)}`);
    }
  });

  it('turns ISO dates into days since 1970-01-01 (values from Python datetime: (date - date(1970,1,1)).days)', () => {
    assert.equal(parseIsoDate('2024-03-01'), 19783);
    assert.equal(parseIsoDate('2000-02-29'), 11016);
    assert.equal(parseIsoDate('1969-12-31'), -1);
    assert.equal(parseIsoDate('0001-01-01'), -719162);
    assert.equal(parseIsoDate('9999-12-31'), 2932896);
  });

  it('turns ISO date-times into fractional days, honouring offsets (values from Python datetime.fromisoformat)', () => {
    const close = (a: number, b: number) => assert.ok(Math.abs(a - b) < 1e-9, `${a} vs ${b}`);
    close(parseIsoDate('2024-03-01T10:00'), 19783.416666666668);
    close(parseIsoDate('2024-03-01 10:00:00'), 19783.416666666668);
    close(parseIsoDate('2024-03-01T10:00:00Z'), 19783.416666666668);
    close(parseIsoDate('2024-03-01T10:00:00+02:00'), 19783.333333333332);
    close(parseIsoDate('2024-03-01T10:00:00-05:30'), 19783.645833333332);
    close(parseIsoDate('2024-03-01T23:59:59.5'), 19783.99999421296);
  });

  it('rejects impossible or non-ISO dates (Gregorian leap rule: common practice)', () => {
    for (const c of ['2023-02-29', '1900-02-29', '2024-13-01', '2024-04-31', '2024-00-10', '2024-3-1', '03/01/2024', '2024-03-01T25:00', '2024-03-01T10', '2024-03-01X', '2024-03-01T10:00+', '20240301']) {
      assert.ok(Number.isNaN(parseIsoDate(c)), c);
    }
  });
});
