/*
 * Pasted readings not yet saved survive a reload of the tab: they are kept in the tab's sessionStorage (never
 * sent anywhere, gone when the tab closes) under the case and the entry mode, and removed once saved.
 */
export type EntryDraft = { specimenId: number; assay: string; replicate: string; total: string; background: string; fromS: string; toS: string };

const key = (caseId: number, mode: string) => `cristae:entry-draft:${caseId}:${mode}`;

export function readEntryDraft(caseId: number, mode: string): EntryDraft | null {
  try {
    const raw = window.sessionStorage.getItem(key(caseId, mode));
    return raw ? (JSON.parse(raw) as EntryDraft) : null;
  } catch {
    return null;
  }
}

export function writeEntryDraft(caseId: number, mode: string, draft: EntryDraft | null): void {
  try {
    if (draft && (draft.total.trim() || draft.background.trim())) window.sessionStorage.setItem(key(caseId, mode), JSON.stringify(draft));
    else window.sessionStorage.removeItem(key(caseId, mode));
  } catch {
    /* storage full or refused: the leave-page warning still protects the text */
  }
}
