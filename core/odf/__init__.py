"""OpenDocument text (ISO/IEC 26300, ODF 1.2/1.3): all .odt XML work lives here, as all .docx
XML work lives in :mod:`core.docx`.  :mod:`.namespaces` names the ODF namespaces once,
:mod:`.package` opens the zip safely, :mod:`.styles` resolves styles and list styles,
:mod:`.numbering` computes list labels and :mod:`.blocks` walks the body into
:class:`core.model.Block` objects."""
