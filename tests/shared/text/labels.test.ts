import { describe, expect, it } from 'vitest';
import { labelProblem, labelSkeleton, normaliseLabel } from '../../../shared/text/labels';

describe('labels that look alike', () => {
  it('gives a Cyrillic or Greek look-alike and a non-breaking hyphen the skeleton of the Latin label', () => {
    expect(labelSkeleton('\u041cH-1')).toBe(labelSkeleton('MH-1')); // Cyrillic capital Em
    expect(labelSkeleton('MH\u20111')).toBe(labelSkeleton('MH-1')); // non-breaking hyphen
    expect(labelSkeleton('\u039c\u0397-1')).toBe(labelSkeleton('mh-1')); // Greek Mu and Eta, any case
    expect(labelSkeleton('ＭＨ－１')).toBe(labelSkeleton('MH-1')); // full width, through NFKC
  });

  it('keeps labels that read differently apart (digits are not folded into letters)', () => {
    expect(labelSkeleton('MH-1')).not.toBe(labelSkeleton('MH-2'));
    expect(labelSkeleton('B-10')).not.toBe(labelSkeleton('B-1O'));
    expect(labelSkeleton('MH 1')).not.toBe(labelSkeleton('MH-1'));
  });

  it('refuses invisible and text-direction characters, naming what to remove', () => {
    expect(labelProblem('MH\u200b-1')).toMatch(/invisible/);
    expect(labelProblem('MH-1\u00ad')).toMatch(/invisible/);
    expect(labelProblem('\ufeffMH-1')).toMatch(/invisible/);
    expect(labelProblem('\u202eMH-1')).toMatch(/text-direction/);
    expect(labelProblem('MH-1\u2066')).toMatch(/text-direction/);
    expect(labelProblem('MH-1\u200f')).toMatch(/text-direction/);
    expect(labelProblem('Main Hall — left beam')).toBeNull();
  });

  it('stores NFKC with single spaces', () => {
    expect(normaliseLabel('  Ｌｏｆｔ\u00a0 A  ')).toBe('Loft A');
  });
});
