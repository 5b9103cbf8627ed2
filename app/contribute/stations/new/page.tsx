import type { Metadata } from "next";
import { StationForm } from "@/components/intake/station-form";
import { PageHeader } from "@/components/ui/page-header";
import { requirePageViewer } from "@/lib/auth/guard";

export const metadata: Metadata = { title: "Register a station" };

export default async function NewStationPage() {
  await requirePageViewer({ path: "/contribute/stations/new" });
  return (
    <div>
      <PageHeader
        title="Register a station"
        lead="A new station waits for a moderator's approval before samples can be submitted for it. The entry checks look at the position (on land, other stations nearby) and the elevation; their warnings go to the moderator with your registration."
      />
      <StationForm />
    </div>
  );
}
