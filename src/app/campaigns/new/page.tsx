import { IfMay } from '@/components/role-context';
import { CampaignForm } from '@/components/CampaignForm';
import { requirePagePrincipal } from '@/server/auth/page-session';

export default async function NewCampaignPage() {
  await requirePagePrincipal();
  return (
    <>
      <h1>New campaign</h1>
      <IfMay action="createCampaign" otherwise={<p className="muted">Creating campaigns needs the planner role; ask an admin.</p>}><CampaignForm /></IfMay>
    </>
  );
}
