package org.corral;

/** A problem with the user's input or files, with a message that names what is wrong. */
public class CorralException extends RuntimeException {
	public CorralException(String message) {
		super(message);
	}

	public CorralException(String message, Throwable cause) {
		super(message, cause);
	}
}
