/**
 * CSV text for simulated columns. Numbers keep 12 significant digits, far
 * below the sampling noise, so the audit sees the simulated values; whole
 * numbers are written as integers.
 */
export function formatCell(x: number): string {
  if (Number.isInteger(x)) return String(x);
  return String(Number(x.toPrecision(12)));
}

export function columnsToCsv(header: string[], columns: ArrayLike<number>[]): string {
  const rows = columns[0]?.length ?? 0;
  const lines: string[] = [header.join(",")];
  for (let i = 0; i < rows; i++) {
    let line = formatCell(columns[0][i]);
    for (let c = 1; c < columns.length; c++) line += `,${formatCell(columns[c][i])}`;
    lines.push(line);
  }
  return `${lines.join("\n")}\n`;
}
