"""The signing policy and SSH signatures.

A checklist's signing policy is who may approve (``approvers``), whether an engineer may
approve their own sign-off (``self_approval``), whether entries are SSH-signed
(``sign_with_ssh``) and the content hash of the ``allowed_signers`` file. Its hash is part of
the checklist's identity and is recorded with every entry: change any of it and every sign-off
made under the old policy reads stale ("signing policy changed") until it is signed again.

Signatures use ``ssh-keygen -Y sign``/``-Y verify`` (OpenSSH 8.1 or newer) in the namespace
``latchbook-review``, the principal being the entry's login. With signing on, the record's
header also carries a signed head (the number of entries and the last entry's hash), so the
header cannot be fixed up after a cut without a signer's key.
"""

from __future__ import annotations

import os
import subprocess
import tempfile
from pathlib import Path
from typing import Any

from reviewer.errors import RecordError, Where
from reviewer.records.canon import entry_bytes, head_bytes

SSH_NAMESPACE = "latchbook-review"


def allowed_signers(checklist: Any) -> Path | None:
    """The checklist's allowed-signers file, or None when it names none."""
    fn = getattr(checklist, "signers_path", None)
    return fn() if callable(fn) else None


def signing(checklist: Any) -> bool:
    """True when the checklist asks for SSH-signed entries."""
    return bool(getattr(checklist, "sign_with_ssh", False))


def _ssh_keygen(args: list[str], data: bytes) -> subprocess.CompletedProcess[bytes]:
    try:
        return subprocess.run(["ssh-keygen", *args], input=data, capture_output=True,
                              timeout=60, check=False)
    except FileNotFoundError:
        raise RecordError("ssh-keygen is not installed; SSH signatures need OpenSSH 8.1 or "
                          "newer") from None
    except subprocess.TimeoutExpired:
        raise RecordError("ssh-keygen did not answer within 60 s (waiting for a passphrase? "
                          "load the key into ssh-agent)") from None


def ssh_sign(data: bytes, key: Path) -> str:
    """An armored SSH signature of ``data`` (namespace ``latchbook-review``)."""
    proc = _ssh_keygen(["-Y", "sign", "-f", str(key), "-n", SSH_NAMESPACE], data)
    if proc.returncode != 0 or b"BEGIN SSH SIGNATURE" not in proc.stdout:
        raise RecordError(f"ssh-keygen could not sign with {key}: "
                          f"{proc.stderr.decode(errors='replace').strip()}")
    return proc.stdout.decode("ascii").strip() + "\n"


def ssh_verify(data: bytes, signature: str, allowed: Path, login: str) -> tuple[bool, str]:
    """Check a signature against an allowed-signers file for principal ``login``."""
    if not login:
        return False, "no login recorded"
    with tempfile.TemporaryDirectory(prefix="latchbook-sig-") as tmp:
        sig = Path(tmp) / "entry.sig"
        try:
            sig.write_text(signature, "ascii")
        except UnicodeEncodeError:
            return False, "the signature is not an armored SSH signature"
        proc = _ssh_keygen(["-Y", "verify", "-f", str(allowed), "-I", login, "-n",
                            SSH_NAMESPACE, "-s", str(sig)], data)
    text = (proc.stdout + proc.stderr).decode(errors="replace").strip()
    return proc.returncode == 0, text


def default_key() -> Path:
    """``~/.ssh/id_ed25519``."""
    return Path(os.path.expanduser("~")) / ".ssh" / "id_ed25519"


def signing_key(checklist: Any, ssh_key: str | Path | None, project_path: Path) -> Path | None:
    """The key to sign with when the checklist asks for signatures (None when it does not)."""
    if not signing(checklist):
        return None
    key = Path(ssh_key) if ssh_key else default_key()
    if not key.exists():
        raise RecordError(f"checklist {checklist.name} asks for SSH-signed entries and there "
                          f"is no key at {key}; give one with --ssh-key (ed25519 recommended)",
                          Where(str(project_path)))
    return key


def sign_entry(entry: dict[str, Any], checklist: Any, key: Path | None,
               project_path: Path) -> dict[str, Any]:
    """Add ``signature`` (when signing is on), checked against the signers before writing."""
    if key is None:
        return entry
    data = entry_bytes(entry)
    sig = ssh_sign(data, key)
    allowed = allowed_signers(checklist)
    if allowed is None or not allowed.exists():
        raise RecordError(f"checklist {checklist.name} asks for SSH-signed entries but its "
                          f"allowed_signers file {allowed or '(none named)'} is not there; "
                          "nothing was written", Where(str(project_path)))
    ok, text = ssh_verify(data, sig, allowed, entry["by"]["login"])
    if not ok:
        raise RecordError(f"your key {key} is not in {allowed} for login "
                          f"{entry['by']['login']} ({text}); nothing was written. Ask the "
                          "checklist's owner to add it", Where(str(project_path)))
    return entry | {"signature": sig}


def sign_head(project: str, entries: int, head: str, key: Path) -> str:
    """The signed head of a record: its entry count and last hash, signed."""
    return ssh_sign(head_bytes(project, entries, head), key)


__all__ = ["SSH_NAMESPACE", "allowed_signers", "default_key", "sign_entry", "sign_head",
           "signing", "signing_key", "ssh_sign", "ssh_verify"]
