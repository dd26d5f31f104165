// One labelled fact in a job's header (a <dt>/<dd> pair inside a <dl>): the job page and the
// head report show the same facts the same way.
export function Fact({ label, figure = false, children }: { label: string; figure?: boolean; children: React.ReactNode }) {
  return (
    <div>
      <dt className="text-stone-500">{label}</dt>
      <dd className={figure ? "figure font-semibold" : "font-semibold"}>{children}</dd>
    </div>
  );
}
