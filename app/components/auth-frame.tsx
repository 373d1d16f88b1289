export function AuthFrame({ title, lead, children }: { title: string; lead: string; children: React.ReactNode }) {
  return (
    <main id="main" className="mx-auto flex min-h-dvh max-w-md flex-col justify-center px-5 py-10">
      <p className="mb-8 text-lg font-semibold tracking-tight text-accent">Nichewise</p>
      <h1 className="h1">{title}</h1>
      <p className="mt-2 mb-6 text-muted">{lead}</p>
      <div className="card">{children}</div>
    </main>
  );
}
