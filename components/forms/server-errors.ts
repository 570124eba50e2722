import type { FieldValues, Path, UseFormSetError } from 'react-hook-form';
import { ApiError, errorMessage } from '@/hooks/api-client';

/**
 * Puts a server refusal where the person will look: each 400 detail next to its field (matched
 * by its dotted path or the path's first part), anything else in the form-level message, which
 * this returns (null when every detail found its field).
 */
export function applyServerErrors<T extends FieldValues>(err: unknown, setError: UseFormSetError<T>, fields: readonly string[]): string | null {
  if (!(err instanceof ApiError)) return errorMessage(err);
  const leftovers: string[] = [];
  const placed = new Set<string>();
  for (const d of err.details) {
    const target = fields.includes(d.path) ? d.path : fields.find((f) => d.path.startsWith(`${f}.`));
    if (target && !placed.has(target)) {
      setError(target as Path<T>, { type: 'server', message: d.message });
      placed.add(target);
    } else if (!target) {
      leftovers.push(d.path ? `${d.path}: ${d.message}` : d.message);
    }
  }
  if (err.details.length === 0) return err.message;
  if (leftovers.length === 0) return err.code === 'VALIDATION' ? 'Please correct the marked fields.' : err.message;
  return `${err.message} ${leftovers.join('; ')}`;
}
