import { withActor, parse, readJson } from "@/lib/http/handle";
import { getSiteSettings, updateSiteSettings, ZSiteSettingsPatch } from "@/lib/db/site-settings";

type TParams = { params: Promise<{ id: string }> };

export const GET = withActor(async ({ actor }, { params }: TParams) => {
  const { id } = await params;
  return Response.json({ site: await getSiteSettings(actor, id) });
});

/** Changes a site's settings (name, kind, address, jurisdiction, rulebook, unit system, consumer-product exemption). */
export const PATCH = withActor(async ({ actor, request }, { params }: TParams) => {
  const { id } = await params;
  const patch = parse(ZSiteSettingsPatch, await readJson(request));
  return Response.json({ site: await updateSiteSettings(actor, id, patch) });
});
