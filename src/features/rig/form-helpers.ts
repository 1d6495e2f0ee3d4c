import { zodResolver } from '@hookform/resolvers/zod';
import type { FieldValues, Path, Resolver, UseFormSetError } from 'react-hook-form';
import type { ZodType } from 'zod';
import { ApiError } from '../../lib/api-client';

/**
 * The shared schema's resolver, run on the typed text after `prepare` turns it into the wire
 * shape (numbers, nulls, kN). The form keeps exactly what was typed; only the submitted value changes.
 */
export function preparedResolver<TForm extends FieldValues, TOut>(schema: ZodType<TOut>, prepare: (values: TForm) => unknown): Resolver<TForm, unknown, TOut> {
  // The inner resolver validates the prepared object, whose type differs from the form's by design.
  const inner = zodResolver(schema as never) as unknown as Resolver<FieldValues, unknown, TOut>;
  return (values, context, options) => inner(prepare(values) as FieldValues, context, options as never) as ReturnType<Resolver<TForm, unknown, TOut>>;
}

/** Puts a 400's field messages next to their fields; answers whether any landed. */
export function applyServerErrors<T extends FieldValues>(setError: UseFormSetError<T>, err: unknown): boolean {
  if (!(err instanceof ApiError)) return false;
  const entries = Object.entries(err.fields);
  for (const [field, message] of entries) setError(field as Path<T>, { type: 'server', message });
  return entries.length > 0;
}

/** '' → null, '12.5' → 12.5, 'abc' or '2,810' → NaN, so the schema names the field rather than guessing. */
export function numberOrNull(text: string | undefined): number | null {
  const t = (text ?? '').trim();
  return t === '' ? null : Number(t);
}

export function textOrNull(text: string | undefined): string | null {
  const t = (text ?? '').trim();
  return t === '' ? null : t;
}
