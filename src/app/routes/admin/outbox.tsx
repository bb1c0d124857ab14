import { PageHeader } from '@/components/ui/layout';
import { OutboxView } from '@/features/outbox/components/outbox-view';

export default function OutboxPage() {
  return (
    <>
      <PageHeader
        title="Sent e-mail"
        lead="Notices Cristae sends to referring clinicians when a report is ready or corrected. They carry the accession number and a sign-in link, never patient details."
      />
      <OutboxView />
    </>
  );
}
