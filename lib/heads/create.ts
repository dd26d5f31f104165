// Writes a head and everything its layout implies: camshafts and journals, one seat per valve
// position and a valve for each seat, tagged with the seat's code.
import type { Db } from "@/db/client";
import { camshafts, heads, journals, seats, valves, type Seat } from "@/db/schema";
import { camshaftLabels, seatCode, seatPositions, type HeadLayout } from "./layout";

type Writer = Pick<Db, "insert">;

export async function createHeadWithSeats(
  tx: Writer,
  jobId: string,
  label: string,
  layout: HeadLayout,
): Promise<{ headId: string; seats: Seat[] }> {
  const [head] = await tx
    .insert(heads)
    .values({
      jobId,
      label,
      arrangement: layout.arrangement,
      cylinderCount: layout.cylinderCount,
      intakeValvesPerCylinder: layout.intakeValvesPerCylinder,
      exhaustValvesPerCylinder: layout.exhaustValvesPerCylinder,
      camshaftCount: layout.camshaftCount,
      journalsPerCamshaft: layout.journalsPerCamshaft,
    })
    .returning({ id: heads.id });
  const headId = head!.id;
  const labels = camshaftLabels(layout);
  for (let c = 0; c < labels.length; c++) {
    const [cam] = await tx
      .insert(camshafts)
      .values({ headId, position: c + 1, label: labels[c]!, journalCount: layout.journalsPerCamshaft })
      .returning({ id: camshafts.id });
    await tx
      .insert(journals)
      .values(Array.from({ length: layout.journalsPerCamshaft }, (_, k) => ({ camshaftId: cam!.id, position: k + 1 })));
  }
  const inserted = await tx
    .insert(seats)
    .values(seatPositions(layout).map((p) => ({ headId, ...p })))
    .returning();
  await tx.insert(valves).values(inserted.map((s) => ({ headId, seatId: s.id, tag: seatCode(s) })));
  return { headId, seats: inserted };
}
