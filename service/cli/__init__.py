"""The ``gearwork`` command line: endpoints in process, batch runs, the service."""
