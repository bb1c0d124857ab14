/** What the browser shows while the first page of a visit loads (the session check and the page's code). */
export function StartingUp() {
  return (
    <p role="status" className="p-8 text-sm text-ink-soft">
      Opening Cristae…
    </p>
  );
}
