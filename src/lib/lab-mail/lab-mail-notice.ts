/** The words of the notice that a lab report arrived by mail. Pure, like the other alert texts. */
import { fitSubject, type AlertContent } from '../alerts/alert-mail';

/** "A lab report arrived by mail and waits for your confirm", with a link to each file's preview. */
export function composeLabReportArrived(input: {
  crewName: string;
  sender: string | null;
  files: readonly { fileName: string; url: string }[];
}): AlertContent {
  const first = input.files[0];
  const names = input.files.map((f) => f.fileName);
  return {
    kind: 'lab_report_arrived',
    subject: fitSubject(`Lab report by mail: ${names.join(', ')} (${input.crewName})`),
    title:
      input.files.length === 1 ? 'A lab report arrived by mail' : `${input.files.length} lab reports arrived by mail`,
    intro: `${input.sender ? `${input.sender} sent` : 'A lab sent'} ${input.files.length === 1 ? 'a report' : `${input.files.length} reports`} to the import address of ${input.crewName}. Nothing is written to your samples until a mechanic or the lead checks the preview and confirms it.`,
    lines: input.files.map((f) => ({ text: `Preview of ${f.fileName}`, url: f.url })),
    action: { label: 'Open the preview', url: first?.url ?? '' },
  };
}
