/** Shown wherever a schedule is shown: the optimiser advises, people and protections decide. */
export function AdvisoryNote() {
  return (
    <p className="rounded-md border border-ash-200 border-l-4 border-l-kiln-500 bg-ash-25 px-3 py-2 text-xs text-ash-700" role="note">
      <strong className="font-semibold text-ash-900">Schedules are advisory.</strong> Equipment protection, grid-connection
      rules and local codes govern; a qualified operator approves every setpoint before it reaches equipment.
    </p>
  );
}
