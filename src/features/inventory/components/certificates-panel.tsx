/**
 * Certificates of a reference-material lot. Every upload is a new version (1, 2, 3…); none is replaced,
 * so a preparation can always show the certificate version it was made with. The server checks the
 * file's type by its content and its size (max 10 MB); its 413/415 answers are shown at the file field.
 */
import { useRef, useState } from 'react';
import { useQuery } from '@tanstack/react-query';
import { CERTIFICATE_MAX_BYTES, type Certificate } from '../../../../shared/schemas/inventory.ts';
import { Button } from '../../../components/ui/button.tsx';
import { Banner, Panel, Spinner } from '../../../components/ui/feedback.tsx';
import { ApiError } from '../../../lib/api-client.ts';
import { formatDateTime } from '../../../lib/format.ts';
import { useUploadCertificate } from '../api/inventory-mutations.ts';
import { certificateFileUrl, certificatesQuery } from '../api/inventory-queries.ts';
import { formatBytes } from '../format.ts';

const ACCEPT = '.pdf,.png,.jpg,.jpeg,application/pdf,image/png,image/jpeg';

function UploadForm({ materialId }: { materialId: number }) {
  const upload = useUploadCertificate(materialId);
  const fileRef = useRef<HTMLInputElement>(null);
  const [fileError, setFileError] = useState<string | null>(null);
  const [noteError, setNoteError] = useState<string | null>(null);
  const [banner, setBanner] = useState<string | null>(null);
  const [done, setDone] = useState<string | null>(null);
  const [note, setNote] = useState('');

  const submit = (e: React.FormEvent) => {
    e.preventDefault();
    setFileError(null);
    setNoteError(null);
    setBanner(null);
    setDone(null);
    const file = fileRef.current?.files?.[0];
    if (!file) {
      setFileError('Choose the certificate file (PDF, PNG or JPEG).');
      return;
    }
    if (file.size > CERTIFICATE_MAX_BYTES) {
      setFileError(`The file is ${formatBytes(file.size)}; the limit is ${formatBytes(CERTIFICATE_MAX_BYTES)}.`);
      return;
    }
    upload.mutate(
      { file, note },
      {
        onSuccess: (c: Certificate) => {
          setDone(`Version ${c.version} (${c.originalName}) was added.`);
          setNote('');
          if (fileRef.current) fileRef.current.value = '';
        },
        onError: (err) => {
          if (err instanceof ApiError && err.fields.note) setNoteError(err.fields.note);
          // 413 (too large) and 415 (not a PDF/PNG/JPEG) are about the file itself.
          if (err instanceof ApiError && (err.status === 413 || err.status === 415 || err.fields.file)) setFileError(err.fields.file ?? err.message);
          else if (!(err instanceof ApiError && err.fields.note)) setBanner(err.message);
        },
      },
    );
  };

  return (
    <form noValidate onSubmit={submit} className="flex flex-col gap-4" data-testid="certificate-upload">
      {banner ? <Banner title="Not uploaded">{banner}</Banner> : null}
      {done ? <Banner tone="ok">{done}</Banner> : null}
      <div className="grid gap-4 md:grid-cols-2">
        <div>
          <label htmlFor="certificate-file" className="mb-1 block text-sm font-semibold">
            Certificate file
          </label>
          <input
            ref={fileRef}
            id="certificate-file"
            name="file"
            type="file"
            accept={ACCEPT}
            aria-invalid={fileError ? true : undefined}
            aria-describedby={`certificate-file-hint${fileError ? ' certificate-file-error' : ''}`}
            onChange={() => setFileError(null)}
            className="field-input file:mr-3 file:min-h-10 file:rounded-md file:border-2 file:border-slate-700 file:bg-card file:px-3 file:font-semibold"
          />
          <p id="certificate-file-hint" className="mt-1 text-sm text-ink-soft">
            PDF, PNG or JPEG, up to 10 MB. Each upload becomes a new version.
          </p>
          {fileError ? (
            <p id="certificate-file-error" role="alert" className="mt-1 text-sm font-semibold text-bad-700" data-testid="certificate-file-error">
              {fileError}
            </p>
          ) : null}
        </div>
        <div>
          <label htmlFor="certificate-note" className="mb-1 block text-sm font-semibold">
            Note (optional)
          </label>
          <input
            id="certificate-note"
            name="note"
            type="text"
            value={note}
            onChange={(e) => setNote(e.target.value)}
            maxLength={500}
            aria-invalid={noteError ? true : undefined}
            className="field-input"
            placeholder="e.g. revised certificate, new expiry"
          />
          {noteError ? (
            <p role="alert" className="mt-1 text-sm font-semibold text-bad-700">
              {noteError}
            </p>
          ) : null}
        </div>
      </div>
      <div>
        <Button type="submit" busy={upload.isPending} data-testid="certificate-upload-submit">
          Upload certificate
        </Button>
      </div>
    </form>
  );
}

export function CertificatesPanel({ materialId, canWrite }: { materialId: number; canWrite: boolean }) {
  const list = useQuery(certificatesQuery(materialId));
  return (
    <Panel title="Certificates" id="certificates">
      <div className="flex flex-col gap-5">
        {list.isPending ? <Spinner label="Loading certificates…" /> : null}
        {list.isError ? <Banner title="Could not load the certificates">{list.error.message}</Banner> : null}
        {list.data && list.data.length === 0 ? <p className="text-ink-soft" data-testid="certificates-empty">No certificate uploaded yet.</p> : null}
        {list.data && list.data.length > 0 ? (
          <div className="max-w-full overflow-x-auto rounded-lg border-2 border-line [contain:inline-size]">
            <table className="w-full min-w-[46rem] border-collapse text-left" data-testid="certificate-table">
              <caption className="sr-only">Certificate versions, newest first</caption>
              <thead className="bg-slate-100 text-sm">
                <tr>
                  <th scope="col" className="px-3 py-3 text-right">Version</th>
                  <th scope="col" className="px-3 py-3">File</th>
                  <th scope="col" className="px-3 py-3 text-right">Size</th>
                  <th scope="col" className="px-3 py-3">SHA-256</th>
                  <th scope="col" className="px-3 py-3">Uploaded</th>
                </tr>
              </thead>
              <tbody>
                {list.data.map((c) => (
                  <tr key={c.id} className="border-t border-line align-middle" data-testid="certificate-row">
                    <td className="num px-3 py-2 text-right text-xl font-bold" data-testid="certificate-version">
                      {c.version}
                    </td>
                    <td className="px-3 py-2">
                      <a
                        href={certificateFileUrl(c.id)}
                        download={c.originalName}
                        className="inline-flex min-h-12 items-center font-semibold text-brass-600 underline underline-offset-4 [overflow-wrap:anywhere]"
                        data-testid="certificate-download"
                      >
                        {c.originalName}
                      </a>
                      {c.note ? <span className="block text-sm text-ink-soft">{c.note}</span> : null}
                    </td>
                    <td className="num whitespace-nowrap px-3 py-2 text-right">{formatBytes(c.sizeBytes)}</td>
                    <td className="px-3 py-2">
                      <span className="num" title={c.sha256}>
                        {c.sha256.slice(0, 12)}…
                      </span>
                    </td>
                    <td className="px-3 py-2">
                      {c.uploadedBy.fullName}
                      <span className="block text-sm text-ink-soft">{formatDateTime(c.uploadedAt)}</span>
                    </td>
                  </tr>
                ))}
              </tbody>
            </table>
          </div>
        ) : null}
        {canWrite ? <UploadForm materialId={materialId} /> : null}
      </div>
    </Panel>
  );
}
