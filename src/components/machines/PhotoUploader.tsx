// The oil change's photo uploader: Uppy's Dashboard (drag and drop, the phone's camera, progress, retry)
// sending each photo to /api/photos. Each stored photo's id becomes a hidden photoIds input of the
// surrounding form, so saving the oil change attaches them. Without JavaScript the form's own file input
// does the job instead; this island switches that input off once it is running.
import { useEffect, useState } from 'react';
import Uppy from '@uppy/core';
import XHRUpload from '@uppy/xhr-upload';
import { Uploader } from '~/components/ui/Uploader';
import type { OutboxPhoto } from '~/lib/offline/outbox';
import { COLLECT_PHOTOS_EVENT, PHOTOS_KEPT_EVENT } from '../offline/offline-events';
import { formatCount } from '~/lib/words/words';

interface Props {
  /** id of the plain file input this island replaces. */
  fallbackInputId: string;
  maxFileBytes: number;
}

interface UploadBody extends Record<string, unknown> {
  photo?: { id: string };
}

export default function PhotoUploader({ fallbackInputId, maxFileBytes }: Props) {
  const [uppy] = useState(() =>
    new Uppy<Record<string, unknown>, UploadBody>({
      restrictions: { maxFileSize: maxFileBytes, allowedFileTypes: ['image/*'], maxNumberOfFiles: 10 },
      autoProceed: true,
    }).use(XHRUpload, { endpoint: '/api/photos', fieldName: 'file', formData: true, limit: 2, withCredentials: true }),
  );
  const [ids, setIds] = useState<string[]>([]);

  useEffect(() => {
    const fallback = document.getElementById(fallbackInputId) as HTMLInputElement | null;
    const wrapper = fallback?.closest('[data-photo-fallback]') as HTMLElement | null;
    if (fallback) fallback.disabled = true;
    if (wrapper) wrapper.hidden = true;
    const onSuccess = (_file: unknown, response: { body?: UploadBody }) => {
      const id = response.body?.photo?.id;
      if (id) setIds((prev) => (prev.includes(id) ? prev : [...prev, id]));
    };
    uppy.on('upload-success', onSuccess);
    // Saving with no network: the form keeps the photos that did not reach the server as Blobs in its
    // outbox, then this uploader lets go of them (so a reconnect does not upload them a second time).
    const onCollect = (e: Event) => {
      const into = (e as CustomEvent<OutboxPhoto[]>).detail;
      for (const f of uppy.getFiles()) {
        if (!f.progress.uploadComplete && f.data instanceof Blob)
          into.push({ name: f.name ?? 'photo', type: f.type ?? 'application/octet-stream', blob: f.data });
      }
    };
    const onKept = () => {
      for (const f of uppy.getFiles()) if (!f.progress.uploadComplete) uppy.removeFile(f.id);
    };
    window.addEventListener(COLLECT_PHOTOS_EVENT, onCollect);
    window.addEventListener(PHOTOS_KEPT_EVENT, onKept);
    return () => {
      window.removeEventListener(COLLECT_PHOTOS_EVENT, onCollect);
      window.removeEventListener(PHOTOS_KEPT_EVENT, onKept);
      uppy.off('upload-success', onSuccess);
      uppy.destroy();
    };
  }, [uppy, fallbackInputId]);

  return (
    <div data-testid="photo-uploader">
      <Uploader
        uppy={uppy}
        height={300}
        width="100%"
        showNativePhotoCameraButton
        nativeCameraFacingMode="environment"
        note="Photos only, up to 10 MB each."
        locale={{ strings: { dropPasteFiles: 'Drop photos here or %{browseFiles}', browseFiles: 'choose photos' } }}
      />
      {ids.map((id) => (
        <input key={id} type="hidden" name="photoIds" value={id} />
      ))}
      <p className="mt-2 text-sm" aria-live="polite">
        {ids.length > 0
          ? `${formatCount(ids.length, 'photo')} ready; ${ids.length === 1 ? 'it is' : 'they are'} attached when you save.`
          : ''}
      </p>
    </div>
  );
}
