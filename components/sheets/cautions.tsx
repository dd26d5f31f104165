// The cautions shown beside every sheet where the work can hurt someone or harm the engine.
export function Cautions({ extra = [] }: { extra?: string[] }) {
  return (
    <aside className="rounded-xl border border-amber-400 bg-amber-50 p-4 text-sm" aria-labelledby="cautions-heading">
      <h2 id="cautions-heading" className="mb-2 font-semibold">
        Cautions
      </h2>
      <ul className="list-disc space-y-1 pl-5">
        <li>Wear eye protection: grit, compound and springs under load can fly (OSHA 29 CFR 1910.133).</li>
        <li>Solvents and cleaners are flammable: work with ventilation, away from flames, in nitrile gloves.</li>
        <li>Abrasive dust irritates eyes and lungs: clean it up wet, do not blow it off.</li>
        {extra.map((e) => (
          <li key={e}>{e}</li>
        ))}
        <li>
          The figures here are the shop&apos;s record, not the engine maker&apos;s data: follow the maker&apos;s service figures,
          sequences and torque values, local codes and licensed practice.
        </li>
      </ul>
    </aside>
  );
}
