import { NichewiseMark } from "~/components/icons";
import { SpotsAndSeasons } from "~/components/illustration";

export function AuthFrame({ title, lead, children }: { title: string; lead: string; children: React.ReactNode }) {
  return (
    <div className="min-h-dvh">
      <div className="day-band" aria-hidden="true" />
      <main id="main" className="mx-auto flex max-w-md flex-col justify-center px-5 py-10">
        <p className="mb-6 inline-flex items-center gap-2 text-lg font-bold tracking-[-0.02em] text-ink">
          <NichewiseMark size={26} />
          Nichewise
        </p>
        <SpotsAndSeasons className="mb-6 h-auto w-full" />
        <h1 className="h1">{title}</h1>
        <p className="mt-2 mb-6 text-muted">{lead}</p>
        <div className="card">{children}</div>
      </main>
    </div>
  );
}
