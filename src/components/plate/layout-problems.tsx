/** What keeps a plate layout from being used, one line each (nothing when there is no problem). */
export function LayoutProblems({ problems }: { problems: string[] }) {
  if (problems.length === 0) return null;
  return (
    <ul aria-label="Problems in the layout" className="list-disc pl-5 text-sm text-below">
      {problems.map((p, i) => (
        <li key={i}>{p}</li>
      ))}
    </ul>
  );
}
