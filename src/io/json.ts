/**
 * JSON with two-space indentation, except that arrays holding only numbers (intervals, histograms)
 * stay on one line, so a timeline of marks reads as `[[0, 60], [120, 300], …]`.
 */
export function formatJson(value: unknown): string {
  const placeholders: string[] = [];
  const text = JSON.stringify(
    value,
    (_key, v: unknown) => {
      if (Array.isArray(v) && v.length > 0 && v.every((x) => typeof x === 'number' || x === null)) {
        placeholders.push(`[${v.map((x) => JSON.stringify(x)).join(', ')}]`);
        return `\u0000${placeholders.length - 1}\u0000`;
      }
      return v;
    },
    2,
  );
  return (text ?? 'null').replace(/"\\u0000(\d+)\\u0000"/g, (_m, i: string) => placeholders[Number(i)]!) + '\n';
}
