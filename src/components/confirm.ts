import { ElMessageBox } from 'element-plus';

/**
 * Ask before a step that is not lightly undone, in Element's warning message box. Resolves true
 * when the user confirms, false when they cancel or close the box. Without `cancel` the cancel
 * button keeps Element's own label.
 */
export async function confirmWarning(message: string, title: string, buttons: { confirm: string; cancel?: string }): Promise<boolean> {
  try {
    await ElMessageBox.confirm(message, title, {
      confirmButtonText: buttons.confirm,
      ...(buttons.cancel ? { cancelButtonText: buttons.cancel } : {}),
      type: 'warning',
    });
    return true;
  } catch {
    return false;
  }
}
