"""The bench page: readings entered in a browser, judged by the sign-off, signed off into the register.

Imported only by ``windsheet bench`` (the web stack is loaded lazily).  ``service``
is the one place it touches the sign-off and the register; ``readings`` turns the
form's fields into a measured-values document; ``page`` lays the sign-off's lines
against the QC rows; ``app`` is the Starlette application and its security.
"""
