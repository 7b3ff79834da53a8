/** What reading a file found: problems (each naming row and column) and warnings, as two lists. */
export function FileNotes(props: {
  problems: { row: number; column?: string; message: string; text: string }[];
  warnings: string[];
}) {
  return (
    <>
      {props.problems.length > 0 && (
        <ul className="problem-list" aria-label="Problems in the file">
          {props.problems.map((p) => (
            <li key={`${p.row}-${p.column}-${p.message}`}>{p.text}</li>
          ))}
        </ul>
      )}
      {props.warnings.length > 0 && (
        <ul className="warning-list">
          {props.warnings.map((w) => (
            <li key={w}>{w}</li>
          ))}
        </ul>
      )}
    </>
  );
}
