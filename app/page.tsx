export default function Home() {
  return (
    <main className="mx-auto max-w-3xl p-8">
      <h1 className="text-3xl font-semibold text-tarn-700">Rainprint</h1>
      <p className="mt-4">Precipitation δ18O, δ2H and d-excess: quality-checked station data and kriged isoscapes.</p>
    </main>
  );
}
