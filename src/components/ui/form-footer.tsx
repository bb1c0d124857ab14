import { Button } from './button';
import { Notice } from './layout';

const spans = { 3: 'sm:col-span-3', 4: 'sm:col-span-4' } as const;

/**
 * The end of an editing form laid out on a grid: the form's error (if any) across the whole row, then the save
 * button (disabled and saying so while saving) and Cancel.
 */
export function FormFooter({
  error,
  saving,
  saveLabel,
  onCancel,
  columns,
}: {
  error: string | null | undefined;
  saving: boolean;
  saveLabel: string;
  onCancel: () => void;
  columns: keyof typeof spans;
}) {
  const span = spans[columns];
  return (
    <>
      {error ? (
        <div className={span}>
          <Notice tone="error">{error}</Notice>
        </div>
      ) : null}
      <div className={`flex gap-2 ${span}`}>
        <Button type="submit" disabled={saving}>
          {saving ? 'Saving…' : saveLabel}
        </Button>
        <Button variant="quiet" onClick={onCancel}>
          Cancel
        </Button>
      </div>
    </>
  );
}
