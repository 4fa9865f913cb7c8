import { describe, expect, it } from 'vitest';
import { pressWearKey, typeWearText } from '../../src/features/rounds/components/wear-keypad';

// derived: issue 3 asks for wear "with one decimal"; the entry schema caps it at 100 mm, so three digits before the point suffice.
describe('pressWearKey', () => {
  it.each([
    ['', '1', '1'],
    ['1', '2', '12'],
    ['12', '.', '12.'],
    ['12.', '5', '12.5'],
    ['12.5', '7', '12.5'], // a second decimal is refused
    ['12.5', '.', '12.5'], // a second point is refused
    ['', '.', '0.'],
    ['0', '5', '5'], // no leading zero
    ['123', '4', '123'],
    ['12.5', 'back', '12.'],
    ['', 'back', ''],
  ])('%j + %j → %j', (text, key, expected) => {
    expect(pressWearKey(text, key)).toBe(expected);
  });
});

describe('typeWearText', () => {
  it.each([
    ['9,5', '', '9.5'], // a decimal comma is read as the point
    [' 12.5 ', '', '12.5'],
    ['12.55', '12.5', '12.5'],
    ['abc', '3', '3'],
    ['', '3', ''],
  ])('%j (was %j) → %j', (raw, previous, expected) => {
    expect(typeWearText(raw, previous)).toBe(expected);
  });
});
