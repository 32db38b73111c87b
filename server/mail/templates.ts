/**
 * E-mail texts for the verification workflow, plain text and HTML, each with a link to the record
 * (`${publicUrl}/preparations/<identifier>`). Names and reasons are HTML-escaped in the HTML part.
 */
export interface MailContent {
  subject: string;
  text: string;
  html: string;
}

export interface RecordRef {
  identifier: string;
  materialName: string;
  analyteFormula: string;
  concentrationDisplay?: string | null;
  version: number;
}

const escapeHtml = (s: string) => s.replace(/[&<>"']/g, (c) => ({ '&': '&amp;', '<': '&lt;', '>': '&gt;', '"': '&quot;', "'": '&#39;' })[c]!);

export function recordLink(publicUrl: string, identifier: string): string {
  return `${publicUrl.replace(/\/+$/, '')}/preparations/${encodeURIComponent(identifier)}`;
}

function compose(subject: string, lines: string[], link: string): MailContent {
  const text = [...lines, '', `Open the record: ${link}`, '', '— Tarebook, Harbourside Water Laboratory'].join('\n');
  const html =
    '<!doctype html><html><body style="font-family: sans-serif; line-height: 1.4">' +
    lines.map((l) => `<p>${escapeHtml(l)}</p>`).join('') +
    `<p><a href="${escapeHtml(link)}">Open ${escapeHtml(subject.split(': ').pop() ?? 'the record')}</a></p>` +
    '<p style="color:#555">— Tarebook, Harbourside Water Laboratory</p></body></html>';
  return { subject, text, html };
}

const what = (r: RecordRef) => `${r.identifier} (${r.analyteFormula} from ${r.materialName}${r.concentrationDisplay ? `, ${r.concentrationDisplay}` : ''}, version ${r.version})`;

export function verificationRequestedMail(r: RecordRef, preparer: string, publicUrl: string): MailContent {
  return compose(
    `Verification requested: ${r.identifier}`,
    [`${preparer} signed ${what(r)} as prepared and asks for a second-person verification.`, 'You can verify it if you did not enter or change any of its data.'],
    recordLink(publicUrl, r.identifier),
  );
}

export function returnedMail(r: RecordRef, verifier: string, reason: string, publicUrl: string): MailContent {
  return compose(
    `Returned for correction: ${r.identifier}`,
    [`${verifier} returned ${what(r)} to you.`, `Reason: ${reason}`, 'Correct the record and sign it as prepared again.'],
    recordLink(publicUrl, r.identifier),
  );
}

export function verifiedMail(r: RecordRef, verifier: string, publicUrl: string): MailContent {
  return compose(`Verified: ${r.identifier}`, [`${verifier} verified ${what(r)}.`], recordLink(publicUrl, r.identifier));
}
