export default function HomePage() {
  return (
    <main className="mx-auto max-w-3xl p-10">
      <h1 className="text-3xl font-semibold">Partita</h1>
    </main>
  );
}
