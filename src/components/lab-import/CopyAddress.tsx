/**
 * The copy button beside the crew's import address. The address itself is plain text in the page (select
 * and copy works without JavaScript); this island only adds the one-press copy and says that it worked.
 */
import { useState } from 'react';

export default function CopyAddress({ address }: { address: string }) {
  const [status, setStatus] = useState('');
  const copy = async () => {
    try {
      await navigator.clipboard.writeText(address);
      setStatus('Copied. Paste it where the lab asks for your results address.');
    } catch {
      setStatus('This browser did not allow copying; select the address and copy it by hand.');
    }
  };
  return (
    <div>
      <button type="button" className="btn-secondary" onClick={() => void copy()} data-testid="copy-import-address">
        Copy address
      </button>
      <p role="status" aria-live="polite" className="mt-1 text-sm">
        {status}
      </p>
    </div>
  );
}
