/**
 * The one upload control of the app: Uppy's Dashboard with Sumpwise's look (src/styles/uploader.css), used by the
 * lab file upload and the oil change's photos alike, so every upload looks and behaves the same.
 */
import type { Body, Meta } from '@uppy/core';
import Dashboard from '@uppy/react/dashboard';
import type { ComponentProps } from 'react';
import '@uppy/core/css/style.min.css';
import '@uppy/dashboard/css/style.min.css';
import '~/styles/uploader.css';

export function Uploader<M extends Meta, B extends Body>(props: ComponentProps<typeof Dashboard<M, B>>) {
  return (
    <div className="sw-uploader">
      <Dashboard<M, B> width="100%" proudlyDisplayPoweredByUppy={false} {...props} />
    </div>
  );
}
