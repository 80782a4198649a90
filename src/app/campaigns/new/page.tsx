import { CampaignForm } from '@/components/CampaignForm';

export default function NewCampaignPage() {
  return (
    <>
      <h1>New campaign</h1>
      <CampaignForm />
    </>
  );
}
