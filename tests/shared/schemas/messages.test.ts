import { describe, expect, it } from 'vitest';
import { z } from 'zod';
import '../../../shared/schemas/common';
import { createUserSchema } from '../../../shared/schemas/staff';
import { createClassTypeSchema } from '../../../shared/schemas/class-types';

const messageOf = (schema: z.ZodType, value: unknown) => {
  const r = schema.safeParse(value);
  if (r.success) throw new Error('expected a refusal');
  return r.error.issues[0].message;
};

describe('field messages in the product’s words', () => {
  it('words a number below its minimum without zod jargon', () => {
    expect(messageOf(z.number().min(1), 0)).toBe('Must be 1 or more');
    expect(messageOf(z.number().int().positive(), 0)).toBe('Must be more than 0');
  });

  it('words a text too long, and a missing one', () => {
    expect(messageOf(z.string().max(80), 'x'.repeat(81))).toBe('At most 80 characters');
    expect(messageOf(z.string().min(1), '')).toBe('Required');
    expect(messageOf(z.object({ name: z.string() }), {})).toBe('Required');
  });

  it('keeps a schema’s own message where it has one', () => {
    expect(messageOf(z.number().min(1, 'At least one class'), 0)).toBe('At least one class');
  });

  it('never shows zod’s defaults for anything the staff or class type forms refuse', () => {
    const bad = [
      createUserSchema.safeParse({ name: 'x'.repeat(500), email: 'not an address', role: 'astronaut', password: 1 }),
      createClassTypeSchema.safeParse({ name: 'x'.repeat(500), apparatus: 'kite', durationMinutes: 0, capacity: -1, performersPerPoint: 1.5 }),
      createClassTypeSchema.safeParse({}),
    ];
    for (const r of bad) {
      expect(r.success).toBe(false);
      for (const issue of r.success ? [] : r.error.issues) expect(issue.message).not.toMatch(/Too (small|big)|expected|Invalid|>=|<=/);
    }
  });
});
