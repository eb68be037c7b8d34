// Every string that came from a data file (column names, levels, the file's name) passes through here before it
// lands in the report: a column called "<script>" must read as text, never run or change the page.

const ENTITIES: Record<string, string> = { '&': '&amp;', '<': '&lt;', '>': '&gt;', '"': '&quot;', "'": '&#39;' };

/** Text for an element's body or an attribute's quoted value. */
export function esc(text: string | number): string {
  return String(text).replace(/[&<>"']/g, (c) => ENTITIES[c]);
}

/** A label cut to `max` characters with an ellipsis, so one long level cannot push a chart off the page. */
export function clip(text: string, max: number): string {
  return text.length <= max ? text : `${text.slice(0, max - 1)}…`;
}
