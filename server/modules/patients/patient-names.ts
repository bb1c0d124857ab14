/**
 * Name keys for duplicate checks and search: lower case, accents folded, runs of spaces and punctuation made
 * one space. "Zoë  O'Hara" and "zoe o hara" give the same key.
 */
export function foldText(s: string): string {
  return s
    .normalize('NFKD')
    .replace(/\p{M}+/gu, '')
    .toLowerCase()
    .replace(/[^\p{L}\p{N}-]+/gu, ' ')
    .trim();
}

export function nameKeyOf(familyName: string, givenName: string): string {
  return foldText(`${familyName} ${givenName}`);
}

/** How the registry writes a patient's name in lists: "Family, Given". */
export function displayName(p: { familyName: string; givenName: string }): string {
  return `${p.familyName}, ${p.givenName}`;
}

/** Search tokens of a query, folded the same way as the stored text. */
export function searchTokens(q: string | undefined): string[] {
  if (!q) return [];
  return foldText(q)
    .split(' ')
    .filter((t) => t.length > 0)
    .slice(0, 6);
}
