/**
 * After QA extends a record's expiry, labels already on the bottles still show the old date: the user is prompted
 * to relabel, which is a reprint of the record's labels with this reason (the print page pre-fills it; the existing
 * label print path numbers and records it as a reprint).
 */
export function relabelReason(oldExpiresOn: string, newExpiresOn: string): string {
  return `Relabel after expiry extension: labels printed before show the expiry ${oldExpiresOn}; the expiry is now ${newExpiresOn}`;
}

/** The print page with the relabel reason pre-filled (query `relabel=<old>..<new>`). */
export function relabelHref(identifier: string, oldExpiresOn: string, newExpiresOn: string): string {
  return `/preparations/${encodeURIComponent(identifier)}/print?relabel=${encodeURIComponent(`${oldExpiresOn}..${newExpiresOn}`)}`;
}

/** The reason to pre-fill from the print page's query, or '' when it holds no valid relabel request. */
export function relabelReasonFromQuery(search: string): string {
  const raw = new URLSearchParams(search).get('relabel') ?? '';
  const m = /^(\d{4}-\d{2}-\d{2})\.\.(\d{4}-\d{2}-\d{2})$/.exec(raw);
  return m ? relabelReason(m[1]!, m[2]!) : '';
}
