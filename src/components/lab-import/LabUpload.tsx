/**
 * The lab file upload island: Uppy's Dashboard (drag and drop, file picker, progress, retry) posting to
 * /api/imports. When it mounts it hides the plain HTML form beside it, which stays the fallback without
 * JavaScript. After a good upload it goes to the file's preview.
 */
import Uppy, { type Body, type Meta } from '@uppy/core';
import { Uploader } from '~/components/ui/Uploader';
import XHRUpload from '@uppy/xhr-upload';
import { useEffect, useState } from 'react';

interface Props {
  endpoint: string;
  maxBytes: number;
  /** id of the plain form to hide once this island runs. */
  fallbackId: string;
}

interface UploadBody extends Body {
  labFileId?: string;
  previewUrl?: string;
  status?: string;
}

/** Reads the shared error shape { error: { message } } so the Dashboard shows the server's own words. */
function readServerMessage(xhr: XMLHttpRequest): string {
  try {
    const body = JSON.parse(xhr.responseText) as { error?: { message?: string } };
    if (body.error?.message) return body.error.message;
  } catch {
    // Not JSON (a proxy's error page): fall through to the status line.
  }
  return xhr.status === 0 ? 'The connection dropped; press retry.' : `The server answered ${xhr.status}; press retry.`;
}

export default function LabUpload({ endpoint, maxBytes, fallbackId }: Props) {
  const [message, setMessage] = useState('');
  const [uppy] = useState(() =>
    new Uppy<Meta, UploadBody>({
      id: 'lab-upload',
      autoProceed: false,
      restrictions: {
        maxNumberOfFiles: 1,
        maxFileSize: maxBytes,
        // The server checks the content; these only steer the file picker.
        allowedFileTypes: [
          '.csv',
          '.tsv',
          '.txt',
          '.xlsx',
          'text/csv',
          'text/tab-separated-values',
          'text/plain',
          'application/vnd.openxmlformats-officedocument.spreadsheetml.sheet',
        ],
      },
    }).use(XHRUpload, {
      endpoint,
      fieldName: 'file',
      formData: true,
      // Nothing but the file travels: the crew is the session's.
      allowedMetaFields: [],
      headers: { accept: 'application/json' },
      limit: 1,
      onAfterResponse(xhr) {
        if (xhr.status >= 400) throw new Error(readServerMessage(xhr));
      },
    }),
  );

  useEffect(() => {
    const fallback = document.getElementById(fallbackId);
    // display:none, not only `hidden`: the form's own flex class would show it again.
    if (fallback) fallback.style.display = 'none';
    const onSuccess = (_file: unknown, response: { body?: UploadBody }) => {
      const url = response.body?.previewUrl;
      if (url && url.startsWith('/imports/')) {
        setMessage('Uploaded. Opening the preview…');
        window.location.assign(url);
      }
    };
    const onError = (_file: unknown, error: Error) => setMessage(error.message);
    uppy.on('upload-success', onSuccess);
    uppy.on('upload-error', onError);
    return () => {
      uppy.off('upload-success', onSuccess);
      uppy.off('upload-error', onError);
      if (fallback) fallback.style.display = '';
    };
  }, [uppy, fallbackId]);

  useEffect(() => () => uppy.destroy(), [uppy]);

  return (
    <div data-testid="lab-upload-dashboard">
      <Uploader
        uppy={uppy}
        width="100%"
        height={320}
        hideProgressDetails={false}
        note="CSV, TSV, text or .xlsx export of the lab report, up to 5 MiB"
      />
      <p role="status" aria-live="polite" className="mt-2 text-sm font-semibold" data-testid="lab-upload-message">
        {message}
      </p>
    </div>
  );
}
