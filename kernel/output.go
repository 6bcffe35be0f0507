package kernel

// Encode returns the message type and the content JSON the kernel publishes on
// iopub for o: display_data (update_display_data for an update, with its
// display id under transient), stream or clear_output.
func (o Output) Encode() (msgType string, content []byte, err error) {
	if o.Clear {
		c, err := marshal(map[string]any{"wait": false})
		return "clear_output", c, err
	}
	if o.Stream != "" {
		c, err := marshal(map[string]any{"name": o.Stream, "text": o.Text})
		return "stream", c, err
	}
	data := o.Data
	if data == nil {
		data = map[string]any{}
	}
	meta := o.Metadata
	if meta == nil {
		meta = map[string]any{}
	}
	c := map[string]any{"data": data, "metadata": meta}
	msgType = "display_data"
	if o.DisplayID != "" {
		c["transient"] = map[string]any{"display_id": o.DisplayID}
		if o.Update {
			msgType = "update_display_data"
		}
	}
	content, err = marshal(c)
	return msgType, content, err
}
