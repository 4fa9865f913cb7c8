import { describe, expect, it } from 'vitest';
import { classifyCai, type CercharClassKey } from '../../shared/domain/cerchar';

// Class table: CERCHAR 1986, as quoted in the ISRM Suggested Method for the CERCHAR abrasivity
// test (Alber et al., Rock Mech. Rock Eng. 47:261–266, 2014); DOMAIN.md §3.
// Which class a shared end point (0.5, 1.0, 2.0, 4.0, 6.0) takes is not in the source: Kerfwise's
// own rule gives it to the higher class (decision documented in shared/domain/cerchar.ts).
describe('classifyCai', () => {
  const inside: [number, CercharClassKey, string][] = [
    // Mid-range values, one per class (source: CERCHAR 1986 via Alber et al. 2014).
    [0.4, 'not_very_abrasive', 'Not very abrasive'],
    [0.75, 'slightly_abrasive', 'Slightly abrasive'],
    [1.5, 'medium_to_abrasive', 'Medium abrasiveness to abrasive'],
    [3.0, 'very_abrasive', 'Very abrasive'],
    [5.0, 'extremely_abrasive', 'Extremely abrasive'],
    [6.5, 'quartzitic', 'Quartzitic'],
  ];
  it.each(inside)('CAI %s is %s', (cai, key, label) => {
    expect(classifyCai(cai)).toEqual({ key, label, outsideTabulatedRange: false });
  });

  const boundaries: [number, CercharClassKey][] = [
    // Table end points (source above); the class chosen follows Kerfwise's "higher class" rule.
    [0.3, 'not_very_abrasive'],
    [0.5, 'slightly_abrasive'],
    [0.99, 'slightly_abrasive'],
    [1.0, 'medium_to_abrasive'],
    [2.0, 'very_abrasive'],
    [3.99, 'very_abrasive'],
    [4.0, 'extremely_abrasive'],
    [6.0, 'quartzitic'],
    [7.0, 'quartzitic'], // top of the table: closed, still inside the tabulated range
  ];
  it.each(boundaries)('boundary CAI %s is %s', (cai, key) => {
    const result = classifyCai(cai);
    expect(result.key).toBe(key);
    expect(result.outsideTabulatedRange).toBe(false);
  });

  it('gives values outside 0.3–7.0 the end class, flagged', () => {
    // Table range 0.3–7.0 (source above); flagging rather than rejecting is Kerfwise's choice.
    expect(classifyCai(0.1)).toEqual({ key: 'not_very_abrasive', label: 'Not very abrasive', outsideTabulatedRange: true });
    expect(classifyCai(0.299)).toMatchObject({ key: 'not_very_abrasive', outsideTabulatedRange: true });
    expect(classifyCai(7.2)).toEqual({ key: 'quartzitic', label: 'Quartzitic', outsideTabulatedRange: true });
  });

  it('rejects values that are not a CAI', () => {
    expect(() => classifyCai(-0.1)).toThrow(RangeError);
    expect(() => classifyCai(Number.NaN)).toThrow(RangeError);
  });
});
