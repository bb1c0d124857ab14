import { useState } from 'react';
import { Card, PageHeader } from '@/components/ui/layout';
import { PlateMapEditor } from '@/features/plate-maps/components/plate-map-editor';
import { PlateMapList } from '@/features/plate-maps/components/plate-map-list';
import type { StoredPlateMap } from '@/schemas/measurement';

export default function PlateLayoutsPage() {
  const [open, setOpen] = useState<StoredPlateMap | null>(null);
  return (
    <>
      <PageHeader
        title="Plate layouts"
        lead="What each well of a 96-well plate holds: which specimen, which assay, total, background or blank, and which replicate. Save a layout once and read every plate file of that run with it."
      />
      <div className="grid grid-cols-[minmax(0,1fr)] gap-6 2xl:grid-cols-[22rem_minmax(0,1fr)]">
        <Card title="Saved layouts">
          <PlateMapList selectedId={open?.id ?? null} onOpen={setOpen} />
        </Card>
        <Card title={open ? `Editing “${open.name}”` : 'New layout'}>
          <PlateMapEditor key={open ? `${open.id}:${open.version}` : 'new'} initial={open} onSaved={setOpen} />
        </Card>
      </div>
    </>
  );
}
