"""LibreOffice's extension manager driven over UNO: for root, whom ``unopkg`` refuses a user install.

``unopkg`` stops with "Cannot run unopkg as root without --shared or --bundled option". The same
extension manager is a UNO singleton (``com.sun.star.deployment.ExtensionManager``) inside a running
LibreOffice, so for root sheetpump starts a headless ``soffice`` on the profile, and runs this file
with LibreOffice's Python to list, add or remove the extension there.

Run as ``PYTHON manager.py PIPE ACTION IDENTIFIER [OXT_URL]``; prints the installed version (``list``)
or nothing. ``uno`` is imported inside :func:`main` only, so the module imports anywhere.
"""

from __future__ import annotations

import sys
import time


def main(argv: list[str]) -> int:
    import uno  # type: ignore[import-not-found]
    import unohelper  # type: ignore[import-not-found]
    from com.sun.star.task import XInteractionHandler  # type: ignore[import-not-found]
    from com.sun.star.ucb import XCommandEnvironment  # type: ignore[import-not-found]

    approve = uno.getTypeByName("com.sun.star.task.XInteractionApprove")

    class Approve(unohelper.Base, XInteractionHandler):
        # What the user would do in unopkg: yes, install it (the extension has no licence to accept).
        def handle(self, request):
            for continuation in request.getContinuations():
                if continuation.queryInterface(approve) is not None:
                    continuation.select()
                    return

    class Quiet(unohelper.Base, XCommandEnvironment):  # no dialogs: nobody could answer them
        def getInteractionHandler(self):
            return Approve()

        def getProgressHandler(self):
            return None

    pipe, action, identifier = argv[:3]
    local = uno.getComponentContext()
    resolver = local.ServiceManager.createInstanceWithContext("com.sun.star.bridge.UnoUrlResolver", local)
    deadline = time.monotonic() + 120
    while True:
        try:
            ctx = resolver.resolve(f"uno:pipe,name={pipe};urp;StarOffice.ComponentContext")
            break
        except Exception:
            if time.monotonic() > deadline:
                raise
            time.sleep(0.3)
    manager = ctx.getValueByName("/singletons/com.sun.star.deployment.ExtensionManager")
    env = Quiet()
    found = [e for e in manager.getDeployedExtensions("user", manager.createAbortChannel(), env)
             if e is not None and e.getIdentifier().Value == identifier]
    if action == "list":
        print(found[0].getVersion() if found else "")
    elif action == "remove":
        for extension in found:
            manager.removeExtension(identifier, extension.getName(), "user", manager.createAbortChannel(), env)
    elif action == "add":
        for extension in found:
            manager.removeExtension(identifier, extension.getName(), "user", manager.createAbortChannel(), env)
        manager.addExtension(argv[3], (), "user", manager.createAbortChannel(), env)
    return 0


if __name__ == "__main__":
    sys.exit(main(sys.argv[1:]))
