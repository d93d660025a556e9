import { ActionForm } from "@/app/_components/action-form";
import { answerInvitationAction } from "@/app/(team)/actions";

/** Accept and Decline for one invitation, wherever invitations are listed. */
export function InvitationAnswer({ invitationId }: { invitationId: string }) {
  return (
    <>
      <ActionForm action={answerInvitationAction} submitLabel="Accept" compact>
        <input type="hidden" name="invitationId" value={invitationId} />
        <input type="hidden" name="answer" value="accept" />
      </ActionForm>
      <ActionForm action={answerInvitationAction} submitLabel="Decline" compact>
        <input type="hidden" name="invitationId" value={invitationId} />
        <input type="hidden" name="answer" value="decline" />
      </ActionForm>
    </>
  );
}
