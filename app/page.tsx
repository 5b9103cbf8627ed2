import Link from "next/link";
import { Cautions } from "@/components/cautions";

const USERS = [
  {
    who: "Hydrogeologists and water consultants",
    need: "the isotopic signature of local rain and its local meteoric water line, to tell where groundwater and springs recharge and how much a reservoir has evaporated.",
  },
  {
    who: "Ecologists and wildlife biologists",
    need: "a δ2H precipitation surface with its uncertainty, to assign the likely origin of a migratory animal from its feathers or hair.",
  },
  {
    who: "Food and forensic provenance laboratories",
    need: "expected δ18O and δ2H for a claimed region, to check whether water, wine or honey is consistent with it.",
  },
  {
    who: "Climate and paleoclimate scientists",
    need: "modern precipitation baselines and deuterium-excess patterns that record where the moisture came from.",
  },
];

export default function Home() {
  return (
    <div className="flex flex-col gap-12">
      <section className="max-w-prose">
        <h1 className="text-3xl font-semibold leading-tight text-ink-900 sm:text-4xl">
          The isotopic fingerprint of rain, for any place, with its uncertainty.
        </h1>
        <p className="mt-4 text-lg text-ink-700">
          Rainprint collects precipitation samples — δ18O, δ2H and deuterium excess — from collection stations run by universities,
          agencies and volunteers. Every sample passes automated checks and a human review. From the accepted data we build
          versioned, citable maps (isoscapes) of the isotopic composition of rain, with honest uncertainty, and answer the question
          most users have: <em>what is the rain like where I work, where no one has a sampler?</em>
        </p>
        <div className="mt-6 flex flex-wrap gap-3">
          <Link href="/map" className="rounded bg-tarn-700 px-4 py-2 font-medium text-white hover:bg-tarn-800">
            Explore the map
          </Link>
          <Link href="/sign-up" className="rounded border border-tarn-700 bg-white px-4 py-2 font-medium text-tarn-800 hover:bg-tarn-50">
            Create a free account
          </Link>
          <Link href="/sign-in" className="rounded border border-ink-300 bg-white px-4 py-2 font-medium text-ink-900 hover:bg-ink-50">
            Sign in
          </Link>
        </div>
      </section>

      <section aria-labelledby="who-heading">
        <h2 id="who-heading" className="text-xl font-semibold">
          Who it is for
        </h2>
        <ul className="mt-4 grid gap-4 sm:grid-cols-2">
          {USERS.map((u) => (
            <li key={u.who} className="rounded-md border border-ink-200 bg-white p-4">
              <p className="font-semibold text-ink-900">{u.who}</p>
              <p className="mt-1 text-ink-700">They need {u.need}</p>
            </li>
          ))}
        </ul>
      </section>

      <section aria-labelledby="what-heading" className="grid gap-6 md:grid-cols-3">
        <h2 id="what-heading" className="sr-only">
          What Rainprint does
        </h2>
        <div>
          <h3 className="font-semibold text-tarn-800">Quality-checked data</h3>
          <p className="mt-1 text-ink-700">
            Contributors register stations and submit sample batches by form or CSV. Automated checks flag impossible values,
            duplicates, evaporated samples and unit mistakes; moderators accept, return or reject each sample with a reason.
          </p>
        </div>
        <div>
          <h3 className="font-semibold text-tarn-800">Editions you can cite</h3>
          <p className="mt-1 text-ink-700">
            An edition freezes the accepted data at one moment: amount-weighted station means, regression-kriged surfaces of
            δ18O and d-excess with their kriging variance, cross-validation and the fitted variograms — reproducible and citable.
          </p>
        </div>
        <div>
          <h3 className="font-semibold text-tarn-800">Answers for your sites</h3>
          <p className="mt-1 text-ink-700">
            A site lookup gives monthly and annual δ18O, δ2H and d-excess with 95 % intervals and a predicted local meteoric water
            line. Subscribers run batch lookups from a file, download data, and institutions use the API.
          </p>
        </div>
      </section>

      <Cautions />
    </div>
  );
}
