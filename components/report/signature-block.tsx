// The report's last piece: who signed the head off and when, and lines to sign and date by hand.
export function SignatureBlock({ signedOff }: { signedOff: { by: string; when: string } | null }) {
  return (
    <section aria-labelledby="report-signature" className="keep-whole flex flex-col gap-3 rounded-xl border border-stone-300 bg-white p-4 print:rounded-none print:border-0 print:border-t print:px-0" data-testid="report-signature">
      <h2 id="report-signature" className="text-lg font-bold">
        Signature
      </h2>
      <p className="text-sm">
        Signed off by:{" "}
        {signedOff ? (
          <>
            <span className="font-semibold">{signedOff.by}</span> on <span className="figure">{signedOff.when}</span>
          </>
        ) : (
          <span className="text-stone-600">not signed off yet</span>
        )}
      </p>
      <div className="grid grid-cols-1 gap-6 pt-6 text-sm sm:grid-cols-[2fr_1fr] print:grid-cols-[2fr_1fr]">
        <p className="border-t border-ink pt-1">Signature</p>
        <p className="border-t border-ink pt-1">Date</p>
      </div>
    </section>
  );
}
