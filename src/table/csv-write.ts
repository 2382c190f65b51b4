/** RFC 4180 cell quoting for the CSV files foldseal writes (LF line ends). */
export function csvCell(text: string): string {
  return /[",\r\n]/.test(text) || text !== text.trim() ? `"${text.replaceAll('"', '""')}"` : text;
}

export function csvLine(cells: readonly string[]): string {
  return cells.map(csvCell).join(',') + '\n';
}
