import assert from 'node:assert/strict';
import { isoWeek, sliceOf, sortSlices, SliceParser, type SliceKey } from '../../src/engine/dataset/timeSlices';

const key = (value: string, granularity: Parameters<typeof sliceOf>[1]): string => {
  const r = sliceOf(value, granularity);
  if ('error' in r) throw new Error(r.error);
  return r.key;
};

describe('time slices', () => {
  it("numbers ISO weeks as Python's datetime.date.isocalendar() does", () => {
    // Reference: Python 3 datetime.date(y, m, d).isocalendar() on each date (run on this machine);
    // the same dates are the examples of the "ISO week date" article on Wikipedia.
    const expected: Record<string, string> = {
      '2005-01-01': '2004-W53',
      '2005-01-02': '2004-W53',
      '2005-12-31': '2005-W52',
      '2007-01-01': '2007-W01',
      '2007-12-30': '2007-W52',
      '2007-12-31': '2008-W01',
      '2008-12-28': '2008-W52',
      '2008-12-29': '2009-W01',
      '2009-12-31': '2009-W53',
      '2010-01-03': '2009-W53',
      '2021-01-03': '2020-W53',
      '2021-01-04': '2021-W01',
    };
    for (const [date, week] of Object.entries(expected)) assert.equal(key(date, 'week'), week, date);
    assert.deepEqual(isoWeek(2020, 12, 31), { isoYear: 2020, week: 53 });
  });

  it('makes year, quarter, month, day and step keys', () => {
    assert.equal(key('2021-08-14', 'year'), '2021');
    assert.equal(key('2021-08-14', 'quarter'), '2021-Q3');
    assert.equal(key('2021-03', 'quarter'), '2021-Q1');
    assert.equal(key('2021-10-01T23:59:59+05:00', 'quarter'), '2021-Q4');
    assert.equal(key('2021-08-14', 'month'), '2021-08');
    assert.equal(key('2021-08-14 10:30', 'day'), '2021-08-14');
    assert.equal(key('2024-02-29', 'day'), '2024-02-29');
    assert.equal(key('2021', 'year'), '2021');
    assert.equal(key('007', 'step'), '7');
    assert.equal(key('-3', 'step'), '-3');
  });

  it('explains unparseable times', () => {
    const error = (value: string, granularity: Parameters<typeof sliceOf>[1]): string => {
      const r = sliceOf(value, granularity);
      assert.ok('error' in r, `${value} should not parse`);
      return r.error;
    };
    assert.match(error('2021-02-30', 'day'), /not a calendar date: 2021-02 has 28 days/);
    assert.match(error('2023-02-29', 'day'), /has 28 days/);
    assert.match(error('2021-13', 'month'), /month 13/);
    assert.match(error('21/08/2021', 'month'), /not an ISO-8601 date/);
    assert.match(error('2021', 'month'), /coarser than the granularity "month"/);
    assert.match(error('2021-08', 'week'), /give at least YYYY-MM-DD/);
    assert.match(error('1.5', 'step'), /not an integer step/);
    assert.match(error('', 'year'), /not an ISO-8601 date/);
  });

  it('sorts slices in time order, not text order', () => {
    const parser = new SliceParser('step');
    const keys = ['10', '9', '-1', '100'].map((v) => parser.parse(v) as SliceKey);
    assert.deepEqual(
      sortSlices(keys).map((k) => k.key),
      ['-1', '9', '10', '100'],
    );
    const weeks = ['2021-01-04', '2020-12-28', '2021-01-03'].map((d) => sliceOf(d, 'week') as SliceKey);
    assert.deepEqual(
      sortSlices(weeks).map((k) => k.key),
      ['2020-W53', '2020-W53', '2021-W01'],
    );
    const quarters = ['2022-01-01', '2021-12-31', '2021-01-01'].map((d) => sliceOf(d, 'quarter') as SliceKey);
    assert.deepEqual(
      sortSlices(quarters).map((k) => k.key),
      ['2021-Q1', '2021-Q4', '2022-Q1'],
    );
  });
});
