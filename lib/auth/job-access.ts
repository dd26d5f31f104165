// Who may record work on a job: supervisors on any job of their shop; technicians on jobs
// assigned to them or to nobody. Reading is open to every role of the shop.
import { can } from "./roles";
import type { Actor } from "./guard";
import { ForbiddenError } from "@/lib/errors";

export function assertCanWorkOn(actor: Actor, job: { assignedTechnicianId: string | null; number: string }): void {
  if (!can(actor.role, "jobs:work")) {
    throw new ForbiddenError("Only technicians and supervisors can record work on a job.");
  }
  if (actor.role === "technician" && job.assignedTechnicianId && job.assignedTechnicianId !== actor.id) {
    throw new ForbiddenError(`Job ${job.number} is assigned to another technician. Ask a supervisor to reassign it.`);
  }
}
