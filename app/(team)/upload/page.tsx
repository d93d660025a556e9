import { Caution } from "@/app/_components/caution";
import { roleAtLeast } from "@/lib/roles";
import { airframesInService } from "@/lib/server/airframes";
import { requireMember } from "@/lib/server/guard";
import { listProfiles } from "@/lib/server/team";
import { Uploader } from "./_components/uploader";

export const dynamic = "force-dynamic";

export default async function UploadPage() {
  const actor = await requireMember("viewer");
  const [airframes, profiles] = await Promise.all([airframesInService(actor), listProfiles(actor)]);
  return (
    <>
      <h1>Upload logs</h1>
      {roleAtLeast(actor.role, "pilot") ? (
        <>
          <p className="muted">
            Drop one file or a whole folder after a heat. Each file is matched to an airframe from
            its <code># airframe:</code> line or its file name; change the match before importing if
            it is wrong.
          </p>
          <Uploader
            airframes={airframes}
            profiles={profiles.map((p) => ({ name: p.name, mapText: p.mapText }))}
          />
        </>
      ) : (
        <p className="muted">
          Your role can view logs but not upload them. Ask an owner for the pilot role.
        </p>
      )}
      <Caution compact />
    </>
  );
}
