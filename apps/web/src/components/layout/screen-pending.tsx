/** Placeholder for a screen whose feature has not been built yet; says so plainly. */
export function ScreenPending({ title, arrives }: { title: string; arrives: string }) {
  return (
    <section aria-labelledby="pending-heading">
      <h1 id="pending-heading" className="text-xl font-semibold">
        {title}
      </h1>
      <p className="mt-2 max-w-prose text-slate-600">This screen is not available yet: {arrives}</p>
    </section>
  );
}
