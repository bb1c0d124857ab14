/** Link styled as a button, for navigation that looks like an action. */
export function actionLinkClass(variant: 'primary' | 'secondary'): string {
  const base = 'inline-flex items-center justify-center gap-2 rounded-md px-3.5 py-1.5 text-sm font-medium transition-colors';
  return variant === 'primary'
    ? `${base} bg-matrix-700 text-white hover:bg-matrix-800`
    : `${base} border border-matrix-300 bg-paper-raised text-matrix-800 hover:bg-matrix-50`;
}
