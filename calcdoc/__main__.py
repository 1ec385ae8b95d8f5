from . import entry

entry()
