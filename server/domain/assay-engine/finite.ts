/**
 * Where a computed value holds a number that is NaN or infinite: the path of the first one (e.g.
 * "fitTotal.slopePerMin"), or null when every number is finite. Results are checked with it before they are
 * stored or answered, so a non-finite number never reaches the database or a screen.
 */
export function firstNonFinite(value: unknown, path = ''): string | null {
  if (typeof value === 'number') return Number.isFinite(value) ? null : path || '(value)';
  if (Array.isArray(value)) {
    for (let i = 0; i < value.length; i += 1) {
      const found = firstNonFinite(value[i], `${path}[${i}]`);
      if (found) return found;
    }
    return null;
  }
  if (value !== null && typeof value === 'object') {
    for (const [key, v] of Object.entries(value)) {
      const found = firstNonFinite(v, path ? `${path}.${key}` : key);
      if (found) return found;
    }
  }
  return null;
}
