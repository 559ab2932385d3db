/**
 * Fills the time zone this device reports into hidden sign-up and sign-in fields, and wires the account page's
 * "Use this device's zone" button. Bundled (the content security policy allows no inline script); without
 * JavaScript the fields stay empty and screens show UTC until the user chooses a zone.
 */
function deviceZone(): string {
  try {
    return Intl.DateTimeFormat().resolvedOptions().timeZone ?? '';
  } catch {
    return '';
  }
}

export function wireDeviceZone(root: ParentNode = document): void {
  const zone = deviceZone();
  if (!zone) return;
  for (const input of root.querySelectorAll<HTMLInputElement>('input[data-device-time-zone]')) input.value = zone;
  for (const button of root.querySelectorAll<HTMLButtonElement>('button[data-use-device-zone]')) {
    const select = document.getElementById(button.dataset.useDeviceZone ?? '');
    if (!(select instanceof HTMLSelectElement)) continue;
    // The server's list may spell the zone otherwise; offer the device's spelling (the server checks it on save).
    if (![...select.options].some((o) => o.value === zone)) select.add(new Option(zone.replaceAll('_', ' '), zone), 1);
    button.hidden = false;
    button.textContent = `Use this device's zone (${zone})`;
    button.addEventListener('click', () => {
      select.value = zone;
      select.dispatchEvent(new Event('change', { bubbles: true }));
    });
  }
}
