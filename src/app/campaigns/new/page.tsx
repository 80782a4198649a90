import { IfMay } from '@/components/role-context';
import { CampaignForm } from '@/components/CampaignForm';

export default function NewCampaignPage() {
  return (
    <>
      <h1>New campaign</h1>
      <IfMay action="createCampaign" otherwise={<p className="muted">Creating campaigns needs the planner role; ask an admin.</p>}><CampaignForm /></IfMay>
    </>
  );
}
