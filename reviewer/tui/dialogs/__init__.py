"""Modal dialogs (``ModalScreen[T]``) that return their answer through ``dismiss``."""
